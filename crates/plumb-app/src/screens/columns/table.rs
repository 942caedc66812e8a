//! The columns' table: type, gaps, range, mean, SD and a small histogram of each column, its
//! role, and the y and x chosen for the bench; and the row that opens that pair.

use eframe::egui::{self, RichText};
use plumb_report::text::num;

use super::spark::histogram_strip;
use crate::action::{Action, Actions};
use crate::state::pair::FitSpec;
use crate::state::roles::Role;
use crate::state::{Screen, State};

/// The y and x chosen on this screen (until then: the bench's pair, else the first two
/// numeric columns as x and y).
#[derive(Debug, Default)]
pub struct Picks {
    y: Option<String>,
    x: Option<String>,
    /// The table the picks were made on (a new file starts afresh).
    table: usize,
}

impl Picks {
    /// Forgets the picks when another table is open.
    pub fn follow(&mut self, state: &State) {
        let table = state
            .loaded()
            .map_or(0, |l| std::sync::Arc::as_ptr(&l.dataset.table) as usize);
        if table != self.table {
            *self = Self {
                table,
                ..Self::default()
            };
        }
    }

    /// The response and predictor to open.
    pub fn pair(&self, state: &State) -> Option<(String, String)> {
        let numeric = &state.loaded()?.dataset.numeric;
        let spec = state.bench().spec();
        let y = self
            .y
            .clone()
            .or_else(|| spec.map(|s| s.y.clone()))
            .or_else(|| numeric.get(1).cloned())?;
        let x = self
            .x
            .clone()
            .or_else(|| spec.map(|s| s.x0().to_string()))
            .or_else(|| numeric.first().cloned())?;
        Some((y, x))
    }
}

/// The pair chosen and the buttons that open it on the bench or show the map.
pub fn pick_row_ui(state: &State, picks: &Picks, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let Some(loaded) = state.loaded() else {
        return out;
    };
    if loaded.dataset.numeric.len() < 2 {
        ui.label("Fewer than two numeric columns: there is no pair to fit.");
        return out;
    }
    ui.horizontal_wrapped(|ui| {
        let pair = picks.pair(state);
        let same = pair.as_ref().is_some_and(|(y, x)| y == x);
        let text = pair
            .as_ref()
            .map_or("choose y and x below".into(), |(y, x)| {
                format!("y = {y}, x = {x}")
            });
        ui.label(RichText::new(text).strong());
        let open = ui
            .add_enabled(
                pair.is_some() && !same,
                egui::Button::new("Open on the bench"),
            )
            .on_hover_text("Fit the chosen y on the chosen x on the pair bench")
            .on_disabled_hover_text("Choose two different columns as y and x in the table below");
        if open.clicked() {
            if let Some((y, x)) = pair {
                out.push(Action::OpenPair(FitSpec::line(&y, &x)));
                out.push(Action::Show(Screen::Bench));
            }
        }
        if ui
            .button("Map how the columns move together")
            .on_hover_text("The co-movement map of every numeric pair")
            .clicked()
        {
            out.push(Action::Show(Screen::Map));
        }
    });
    out
}

const HEADERS: [(&str, &str); 11] = [
    ("column", "Name in the file"),
    ("type", "numeric, text, or empty"),
    ("missing", "Cells with no value"),
    ("min", "Smallest value"),
    ("max", "Largest value"),
    ("mean", "Mean of the values"),
    ("SD", "Standard deviation of the values (n − 1)"),
    (
        "spread",
        "How the values spread between min and max: equal-width bins",
    ),
    (
        "role",
        "Group colours the points; row order is the order of measurement; ID names the rows",
    ),
    ("y", "The response to fit"),
    ("x", "The predictor"),
];

/// The table of columns; picking y or x updates `picks`, a role choice becomes an action.
pub fn column_table_ui(state: &State, picks: &mut Picks, ui: &mut egui::Ui) -> Actions {
    let mut out = Actions::none();
    let Some(loaded) = state.loaded() else {
        return out;
    };
    let d = &loaded.dataset;
    let pair = picks.pair(state);
    egui::Grid::new("column-summary")
        .striped(true)
        .num_columns(HEADERS.len())
        .show(ui, |ui| {
            for (h, tip) in HEADERS {
                ui.label(RichText::new(h).strong()).on_hover_text(tip);
            }
            ui.end_row();
            for (s, facts) in d.summaries.iter().zip(&d.facts) {
                ui.label(&s.name);
                ui.label(s.kind);
                ui.label(s.missing.to_string());
                ui.label(s.min.map_or("—".into(), num));
                ui.label(s.max.map_or("—".into(), num));
                ui.label(facts.as_ref().map_or("—".into(), |f| num(f.mean)));
                ui.label(facts.as_ref().map_or("—".into(), |f| num(f.sd)));
                match facts {
                    Some(f) => histogram_strip(ui, &f.bins),
                    None => {
                        ui.weak("—");
                    }
                }
                out.extend(role_ui(state, &s.name, ui));
                let numeric = s.kind == "numeric";
                let (y, x) = pair.clone().unzip();
                if let Some(v) = pick_ui(ui, "y", &s.name, y.as_deref(), numeric) {
                    picks.y = Some(v);
                }
                if let Some(v) = pick_ui(ui, "x", &s.name, x.as_deref(), numeric) {
                    picks.x = Some(v);
                }
                ui.end_row();
            }
        });
    out
}

/// A toggle choosing `column` as `which` (y or x); its accessible name is `y: column`.
fn pick_ui(
    ui: &mut egui::Ui,
    which: &str,
    column: &str,
    current: Option<&str>,
    numeric: bool,
) -> Option<String> {
    if !numeric {
        ui.label("");
        return None;
    }
    let on = current == Some(column);
    let r = ui
        .add(egui::Button::selectable(on, which))
        .on_hover_text(format!("Fit with {column} as {which}"));
    let name = format!("{which}: {column}");
    r.widget_info(|| egui::WidgetInfo::selected(egui::Role::Button, true, on, &name));
    r.clicked().then(|| column.to_string())
}

/// The role choice of one column: roles it cannot take are shown greyed with the reason.
fn role_ui(state: &State, column: &str, ui: &mut egui::Ui) -> Actions {
    let Some(loaded) = state.loaded() else {
        return Actions::none();
    };
    let d = &loaded.dataset;
    let current = state.role_of(column);
    let mut picked = None;
    let suggested = current == Role::Id && d.suggested_id.as_deref() == Some(column);
    let r = egui::ComboBox::from_id_salt(("role", column))
        .selected_text(current.label())
        .width(90.0)
        .show_ui(ui, |ui| {
            for role in Role::ALL {
                let why = role.refusal(d, column);
                let b = ui
                    .add_enabled(
                        why.is_none(),
                        egui::Button::selectable(current == role, role.label()),
                    )
                    .on_hover_text(role.tip());
                let b = match &why {
                    Some(w) => b.on_disabled_hover_text(w),
                    None => b,
                };
                if b.clicked() && role != current {
                    picked = Some(role);
                }
            }
        })
        .response;
    let tip = if suggested {
        "ID suggested because every cell is filled and no two are alike; choose — to name rows by number only"
    } else {
        "What this column is for beyond y and x"
    };
    let name = format!("role of {column}");
    r.widget_info(|| egui::WidgetInfo::labeled(egui::Role::ComboBox, true, &name));
    r.on_hover_text(tip);
    Actions::from(picked.map(|role| Action::SetRole {
        column: column.to_string(),
        role,
    }))
}
