//! The assumption checks in `plumb fit` and `plumb calibrate`: JSON and text.

use std::fmt::Write;

use plumb_data::analysis::Checks;
use plumb_report::wording;
use serde_json::{json, Value};

/// The `checks` key: each check's figures, or why it could not be made.
pub fn json(c: &Checks) -> Value {
    let spread = match &c.spread {
        Ok(b) => json!({ "test": "breusch-pagan-studentized", "against": "fitted values",
            "statistic": b.statistic, "df": b.df, "p_value": b.p_value }),
        Err(e) => json!({ "undefined": e }),
    };
    let order = c.order.as_ref().map(|o| {
        json!({
            "column": o.column,
            "durbin_watson": match &o.durbin_watson { Ok(d) => json!(d), Err(e) => json!({ "undefined": e }) },
            "sign_runs": match &o.runs {
                Ok(r) => json!({ "runs": r.runs, "positive": r.positive, "negative": r.negative,
                    "expected": r.expected, "z": r.z, "p_value": r.p_value }),
                Err(e) => json!({ "undefined": e }),
            },
        })
    });
    let (test, result) = &c.normality;
    let normality = match result {
        Ok(n) => json!({ "test": test.key(), "statistic": n.statistic, "p_value": n.p_value,
            "p_is_bound": n.p_is_bound }),
        Err(e) => json!({ "test": test.key(), "undefined": e }),
    };
    let flags: Vec<&str> = wording::check_cues(c)
        .into_iter()
        .filter(|q| q.flagged)
        .map(|q| q.topic)
        .collect();
    json!({ "spread": spread, "sequence": order, "normality": normality, "flagged": flags })
}

/// The checks as text lines: the figures, and what a flagged one means.
pub fn write(out: &mut String, c: &Checks) -> std::fmt::Result {
    writeln!(out, "  checks of the residuals")?;
    for cue in wording::check_cues(c) {
        let mark = if cue.flagged { "look" } else { "ok" };
        writeln!(out, "    {:<10} {mark:<5} {}", cue.topic, cue.figures)?;
        if cue.flagged {
            writeln!(out, "               {}", cue.meaning)?;
        }
    }
    writeln!(out)
}
