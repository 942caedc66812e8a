//! The prompt that asks why, after rows are excluded without a reason.

use eframe::egui;

use crate::action::{Action, Actions};
use crate::state::marks::DEFAULT_REASON;
use crate::state::Prompt;

/// The modal prompt for `prompt`'s rows; `text` is the reason being typed (cleared once it is
/// recorded).
pub fn reason_prompt_ui(
    prompt: Option<&Prompt>,
    text: &mut String,
    ctx: &egui::Context,
) -> Actions {
    let Some(prompt) = prompt else {
        return Actions::none();
    };
    let done = egui::Modal::new(egui::Id::unique("reason-prompt"))
        .show(ctx, |ui| {
            ui.set_max_width(460.0);
            let rows: Vec<String> = prompt.rows.iter().map(usize::to_string).collect();
            let heading = ui.heading(format!("Why leave out row {}?", rows.join(", ")));
            ui.label(
                "The reason is recorded with the exclusion, in the session and in the summary.",
            );
            let field = ui
                .add(
                    egui::TextEdit::multiline(text)
                        .hint_text("e.g. pipette slipped at this standard (lab notebook p. 14)")
                        .desired_rows(2)
                        .desired_width(f32::INFINITY),
                )
                .labelled_by(heading.id);
            field.request_focus();
            let buttons = ui.horizontal(|ui| {
                if ui
                    .button("Record reason")
                    .on_hover_text("Keep this reason with the exclusion")
                    .clicked()
                {
                    Some(text.clone())
                } else if ui
                    .button("Use the default text")
                    .on_hover_text(format!("Record “{DEFAULT_REASON}”"))
                    .clicked()
                {
                    Some(String::new())
                } else {
                    None
                }
            });
            let enter = ui.input(|i| i.key_pressed(egui::Key::Enter) && !i.modifiers.shift);
            buttons
                .inner
                .or_else(|| enter.then(|| text.trim_end_matches('\n').to_string()))
        })
        .inner;
    match done {
        Some(reason) => {
            text.clear();
            Action::RecordReason(reason).into()
        }
        None => Actions::none(),
    }
}
