//! The roles a column can play beyond y and x: the group that colours the points, the order
//! the rows were measured in, and the ID that names each row.
//!
//! Only the ID is kept here. The group role *is* the bench's colouring column and the
//! row-order role *is* the order the sequence checks follow (and the map's shared-trend
//! guard, which is set with it): the columns screen shows and sets those, so each fact has one
//! place.

use plumb_data::analysis::RowOrder;
use plumb_report::ColumnRoles;

use super::dataset::Dataset;
use super::map::MapKey;
use super::State;

/// What a column is for.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Default)]
pub enum Role {
    /// Nothing beyond being a column.
    #[default]
    None,
    /// Colours the points, a line per level.
    Group,
    /// The order the rows were measured in (run sequence, time).
    Order,
    /// Names each row in the ledger, the influence table and the tooltips.
    Id,
}

impl Role {
    /// Every role, as the columns screen offers them.
    pub const ALL: [Self; 4] = [Self::None, Self::Group, Self::Order, Self::Id];

    /// Its name on the columns screen.
    pub fn label(self) -> &'static str {
        match self {
            Self::None => "—",
            Self::Group => "group",
            Self::Order => "row order",
            Self::Id => "ID",
        }
    }

    /// Why `column` of `data` cannot take this role (`None`: it can).
    pub fn refusal(self, data: &Dataset, column: &str) -> Option<String> {
        let numeric = data.numeric.iter().any(|c| c == column);
        match self {
            Self::None | Self::Id => None,
            Self::Group => (!data.groups.iter().any(|(c, _)| c == column)).then(|| {
                format!(
                    "a group is a text column with 2 to {} different values",
                    super::dataset::MAX_GROUPS
                )
            }),
            Self::Order => {
                (!numeric).then(|| "a row order is a numeric column (run number, time)".into())
            }
        }
    }

    /// What it does, for the role choice's tooltip.
    pub fn tip(self) -> &'static str {
        match self {
            Self::None => "No role",
            Self::Group => "Colour the bench's points by this column, with a line per group",
            Self::Order => "The order the rows were measured in: the sequence checks of the residuals follow it, and the co-movement map guards against a shared trend along it",
            Self::Id => "Name each row by this column in the ledger, the influence table and the tooltips",
        }
    }
}

/// The ID column chosen (kept in the session).
#[derive(Debug, Clone, PartialEq, Eq, Default)]
pub struct Roles {
    /// The column naming the rows.
    pub id: Option<String>,
}

/// Names of data rows: the ID column's cell, or for a sample the row's number in the file.
#[derive(Debug, Clone, Copy)]
pub struct RowNames<'a> {
    data: Option<&'a Dataset>,
    id: Option<&'a str>,
}

impl<'a> RowNames<'a> {
    /// Rows of `data` named by `id` (no names without data).
    pub fn new(data: Option<&'a Dataset>, id: Option<&'a str>) -> Self {
        Self { data, id }
    }

    /// The name of 1-based data row `row`: its ID cell (when an ID column is chosen and the
    /// cell is filled), else `file row N` for a sampled table; `None` otherwise.
    pub fn name(&self, row: usize) -> Option<String> {
        let data = self.data?;
        if let Some(v) = self.id.and_then(|c| data.cell_text(c, row)) {
            return Some(v);
        }
        let s = data.sample.as_ref()?;
        let file_row = s.file_rows.get(row.checked_sub(1)?)?;
        Some(format!("file row {}", plumb_report::text::count(*file_row)))
    }

    /// `row 17 (Q017)`, or `row 17` without a name.
    pub fn label(&self, row: usize) -> String {
        match self.name(row) {
            Some(n) => format!("row {row} ({n})"),
            None => format!("row {row}"),
        }
    }

    /// `17 · Q017`, or `17`: the short form for a table cell.
    pub fn short(&self, row: usize) -> String {
        match self.name(row) {
            Some(n) => format!("{row} · {n}"),
            None => row.to_string(),
        }
    }
}

impl State {
    /// The ID column chosen on the columns screen.
    pub fn id_column(&self) -> Option<&str> {
        self.roles.id.as_deref()
    }

    /// Names of the open file's rows (see [`RowNames::name`]); pass it where `&State` is not
    /// at hand (the bench's `Scene` carries one).
    pub fn row_names(&self) -> RowNames<'_> {
        RowNames::new(self.loaded().map(|l| &l.dataset), self.id_column())
    }

    /// The name of 1-based data row `row` (its ID cell, or its row in the file for a sample).
    pub fn row_name(&self, row: usize) -> Option<String> {
        self.row_names().name(row)
    }

    /// The role `column` plays now.
    pub fn role_of(&self, column: &str) -> Role {
        if self.id_column() == Some(column) {
            Role::Id
        } else if self.bench.colouring().column.as_deref() == Some(column) {
            Role::Group
        } else if self.bench.reading().order == RowOrder::Column(column.to_string()) {
            Role::Order
        } else {
            Role::None
        }
    }

    /// Gives `column` the role `role` (a column has one role; a role one column): the group
    /// colours the bench's points, the row order becomes the sequence checks' order and the
    /// map's trend guard, the ID names the rows. A role the column cannot take is refused
    /// with the reason.
    pub(crate) fn set_role(&mut self, column: &str, role: Role) {
        let Some(data) = self.loaded().map(|l| l.dataset.clone()) else {
            return self.fail("open a data file first");
        };
        if data.table.column(column).is_none() {
            return self.fail(format!("{}: no column named '{column}'", data.file_name()));
        }
        if let Some(why) = role.refusal(&data, column) {
            return self.fail(format!("'{column}' cannot be the {}: {why}", role.label()));
        }
        self.clear_role_of(column, &data);
        match role {
            Role::None => {}
            Role::Group => self.colour_by(Some(column.to_string())),
            Role::Order => self.set_order_role(Some(column)),
            Role::Id => self.roles.id = Some(column.to_string()),
        }
    }

    /// Takes away whatever role `column` had.
    fn clear_role_of(&mut self, column: &str, data: &Dataset) {
        match self.role_of(column) {
            Role::None => {}
            Role::Group => self.bench.colour_by(data, None),
            Role::Order => self.set_order_role(None),
            Role::Id => self.roles.id = None,
        }
    }

    /// The sequence checks' order and the map's trend guard follow `column` (or nothing).
    fn set_order_role(&mut self, column: Option<&str>) {
        let mut reading = self.bench.reading().clone();
        reading.order = column.map_or(RowOrder::None, |c| RowOrder::Column(c.to_string()));
        self.bench.set_reading(reading);
        self.map.set_key(MapKey {
            order: column.map(str::to_string),
            ..self.map.key().clone()
        });
    }

    /// The roles to record in a session.
    pub fn column_roles(&self) -> ColumnRoles {
        ColumnRoles {
            group: self.bench.colouring().column.clone(),
            id: Some(self.roles.id.clone()),
        }
    }

    /// The roles a freshly opened file starts with: those `saved` in a session (or kept from
    /// the same file read again), else the suggested ID (see
    /// [`super::column_facts::suggested_id`]) and no group. The map's trend guard follows
    /// the sequence checks' order when that is a column.
    pub(crate) fn start_roles(&mut self, saved: Option<ColumnRoles>) {
        let saved = saved.unwrap_or_default();
        let suggested = self.loaded().and_then(|l| l.dataset.suggested_id.clone());
        self.roles = Roles {
            id: saved.id.unwrap_or(suggested),
        };
        if saved.group.is_some() {
            self.colour_by(saved.group);
        }
        if let RowOrder::Column(c) = &self.bench.reading().order {
            let order = Some(c.clone());
            self.map.set_key(MapKey {
                order,
                ..self.map.key().clone()
            });
        }
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn settle(state: &mut State) {
        let start = std::time::Instant::now();
        while state.is_busy() {
            assert!(start.elapsed().as_secs() < 60, "still busy");
            state.poll();
            std::thread::sleep(std::time::Duration::from_millis(5));
        }
    }

    fn open(dir: &std::path::Path) -> (State, std::path::PathBuf) {
        let path = dir.join("d.csv");
        let mut text = String::from("tag,shift,run,x,y\n");
        for i in 1..=20 {
            let shift = if i % 2 == 0 { "day" } else { "night" };
            text.push_str(&format!("T{i},{shift},{i},{i},{}\n", 3 + 2 * i + i % 3));
        }
        std::fs::write(&path, text).expect("write");
        let mut state = State::new(None);
        state.open_path(&path);
        settle(&mut state);
        assert!(state.loaded().is_some(), "{:?}", state.status());
        (state, path)
    }

    #[test]
    fn roles_start_from_the_suggested_id_and_each_role_has_one_column() {
        let dir = tempfile::tempdir().expect("dir");
        let (mut state, _) = open(dir.path());
        assert_eq!(state.id_column(), Some("tag"), "suggested");
        assert_eq!(state.role_of("tag"), Role::Id);
        assert_eq!(state.row_name(3).as_deref(), Some("T3"));
        assert_eq!(state.row_names().label(3), "row 3 (T3)");
        state.set_role("run", Role::Id);
        assert_eq!(
            (state.role_of("tag"), state.role_of("run")),
            (Role::None, Role::Id)
        );
        assert_eq!(state.row_name(3).as_deref(), Some("3"), "a numeric ID");
        state.set_role("shift", Role::Group);
        assert_eq!(state.bench().colouring().column.as_deref(), Some("shift"));
        state.set_role("x", Role::Order);
        assert_eq!(state.bench().reading().order, RowOrder::Column("x".into()));
        assert_eq!(state.map().key().order.as_deref(), Some("x"));
        state.set_role("x", Role::None);
        assert_eq!(state.bench().reading().order, RowOrder::None);
        assert_eq!(state.map().key().order, None);
        state.set_role("tag", Role::Group);
        assert!(
            state.status().is_some_and(|s| s.error),
            "20 levels are no group"
        );
        assert_eq!(state.role_of("tag"), Role::None);
        state.set_role("run", Role::None);
        assert_eq!(state.row_name(3), None, "rows go by number alone");
    }

    #[test]
    fn roles_travel_with_the_session() {
        let dir = tempfile::tempdir().expect("dir");
        let (mut state, _) = open(dir.path());
        state.set_role("shift", Role::Group);
        state.set_role("tag", Role::None);
        state.set_role("run", Role::Order);
        let session = dir.path().join("s.plumb");
        state.save_session_to(&session);
        assert!(
            state.status().is_some_and(|s| !s.error),
            "{:?}",
            state.status()
        );
        let mut again = State::new(None);
        again.open_path(&session);
        settle(&mut again);
        assert_eq!(again.id_column(), None, "no ID chosen stays chosen");
        assert_eq!(again.role_of("shift"), Role::Group);
        assert_eq!(again.role_of("run"), Role::Order);
        assert_eq!(again.map().key().order.as_deref(), Some("run"));
    }
}
