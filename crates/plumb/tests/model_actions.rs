//! Model building on the bench, driven by actions: several predictors with a grouping factor,
//! transforms, Box–Cox, two fits side by side and residuals against a chosen column. Every
//! number is checked against `plumb fit` with the same flags (an independent process reading
//! the file afresh), and the comparison against `plumb fit --compare-…`.

mod common;

use common::{assert_same_numbers, cli_fit_with, close, demo, live, settle};

use plumb_app::{Action, FitSpec, Screen, Workbench};
use plumb_core::regression::Transform;
use plumb_data::analysis::{Factor, ResponseScale};

/// The workbench on a copy of the jar tests in `dir` (sessions saved there find their data
/// beside them).
fn jar_tests(dir: &std::path::Path) -> Workbench {
    let data = dir.join("jar-tests.csv");
    std::fs::copy(demo("jar-tests.csv"), &data).expect("copy");
    let mut wb = Workbench::new(Some(dir.join("config")));
    wb.apply(Action::Open(data));
    settle(&mut wb);
    assert!(wb.loaded().is_some(), "{:?}", wb.status());
    wb.apply(Action::Show(Screen::Bench));
    wb
}

fn exclude(wb: &mut Workbench, row: usize) {
    wb.apply(Action::Exclude {
        rows: vec![row],
        reason: Some("jar cracked during settling".into()),
    });
    settle(wb);
}

#[test]
fn two_predictors_and_an_analyst_factor_give_the_command_lines_numbers_and_group_tests() {
    let dir = tempfile::tempdir().expect("dir");
    let mut wb = jar_tests(dir.path());
    let mut spec = FitSpec::line("settled_ntu", "dose_mg_l");
    spec.x.push("raw_ntu".into());
    spec.factor = Some(Factor {
        column: "analyst".into(),
        reference: Some("TS".into()),
        separate_slopes: true,
    });
    wb.apply(Action::OpenPair(spec));
    settle(&mut wb);
    exclude(&mut wb, 9);
    let cli = cli_fit_with(
        &demo("jar-tests.csv"),
        &[
            "--y",
            "settled_ntu",
            "--x",
            "dose_mg_l",
            "--x",
            "raw_ntu",
            "--group",
            "analyst",
            "--reference",
            "TS",
            "--separate-slopes",
            "--exclude",
            "9",
        ],
    );
    assert_same_numbers(&live(&wb), &cli);
    let d = wb.bench().diagnostics().expect("diagnostics");
    let g = d.groups.as_ref().expect("group tests");
    let theirs = &cli["groups"];
    assert_eq!(g.table[0].level, "TS", "the reference level comes first");
    for (ours, key) in [
        (g.equal_slopes.p_value, "equal_slopes"),
        (g.common_line.p_value, "common_line"),
    ] {
        let p = theirs[key]["p_value"].as_f64().expect("p");
        assert!(close(ours, p), "{key}: bench {ours}, plumb fit {p}");
    }
    // One added-variable view per predictor term, each with its coefficient as slope.
    let fit = d.fit.as_ref().expect("fit");
    let terms: Vec<&str> = d.views.added.iter().map(|a| a.term.as_str()).collect();
    assert_eq!(terms, ["dose_mg_l", "raw_ntu"]);
    for a in &d.views.added {
        let c = fit
            .coefficients
            .iter()
            .find(|c| c.term == a.term)
            .expect("term");
        assert!(
            close(a.slope, c.estimate),
            "{}: {} vs {}",
            a.term,
            a.slope,
            c.estimate
        );
        assert_eq!(a.cloud.points.len(), fit.n);
    }
}

#[test]
fn transforms_and_box_cox_follow_the_command_line_after_an_exclusion() {
    let dir = tempfile::tempdir().expect("dir");
    let mut wb = jar_tests(dir.path());
    let mut spec = FitSpec::line("settled_ntu", "dose_mg_l");
    spec.response = ResponseScale::Fixed(Transform::Ln);
    spec.x_transforms = vec![("dose_mg_l".into(), Transform::Sqrt)];
    wb.apply(Action::OpenPair(spec.clone()));
    settle(&mut wb);
    exclude(&mut wb, 4);
    let data = demo("jar-tests.csv");
    let base = ["--y", "settled_ntu", "--x", "dose_mg_l", "--exclude", "4"];
    let logged = [
        &base[..],
        &["--transform-y", "ln", "--transform", "dose_mg_l=sqrt"],
    ]
    .concat();
    assert_same_numbers(&live(&wb), &cli_fit_with(&data, &logged));
    let d = wb.bench().diagnostics().expect("diagnostics");
    assert_eq!(d.scale, "ln(settled_ntu)");

    spec.response = ResponseScale::BoxCox;
    spec.x_transforms.clear();
    wb.apply(Action::OpenPair(spec));
    settle(&mut wb);
    let cli = cli_fit_with(&data, &[&base[..], &["--transform-y", "box-cox"]].concat());
    let lambda = cli["box_cox"]["lambda"].as_f64().expect("λ");
    let ours = wb.bench().diagnostics().and_then(|d| d.boxcox).expect("λ̂");
    assert!(
        (ours.lambda - lambda).abs() < 1e-9,
        "λ {} vs {lambda}",
        ours.lambda
    );
    // The live fit follows λ̂ of the rows in use once the diagnostics are in.
    assert_same_numbers(&live(&wb), &cli);
}

#[test]
fn a_kept_line_beside_the_suggested_curve_has_the_command_lines_partial_f_and_survives_a_save() {
    let dir = tempfile::tempdir().expect("dir");
    let mut wb = jar_tests(dir.path());
    wb.apply(Action::OpenPair(FitSpec::line("settled_ntu", "dose_mg_l")));
    settle(&mut wb);
    wb.apply(Action::Exclude {
        rows: vec![17, 38],
        reason: Some("decimal point typed one place off".into()),
    });
    settle(&mut wb);
    let d = wb.bench().diagnostics().expect("diagnostics");
    let suggested = d.extras.as_ref().expect("extras").suggested_degree();
    assert!(
        suggested >= 2,
        "the jar tests bend: the ladder suggests {suggested}"
    );
    // What the cue's button asks for: keep the line, fit the suggested degree.
    wb.apply(Action::KeepForComparison(true));
    let mut curve = FitSpec::line("settled_ntu", "dose_mg_l");
    curve.degree = suggested;
    wb.apply(Action::OpenPair(curve.clone()));
    settle(&mut wb);
    let degree = suggested.to_string();
    let args = [
        "--y",
        "settled_ntu",
        "--x",
        "dose_mg_l",
        "--degree",
        &degree,
        "--compare-degree",
        "1",
        "--exclude",
        "17,38",
    ];
    let cli = cli_fit_with(&demo("jar-tests.csv"), &args);
    assert_same_numbers(&live(&wb), &cli);
    let check = |wb: &Workbench| {
        let d = wb.bench().diagnostics().expect("diagnostics");
        let kept = d.kept.as_ref().expect("kept fit");
        assert_eq!(kept.spec, FitSpec::line("settled_ntu", "dose_mg_l"));
        assert!(!kept.curves.is_empty(), "the kept line is drawn");
        let c = kept.comparison.as_ref().expect("comparison");
        let f = c.nested.as_ref().expect("the line is nested in the curve");
        let theirs = &cli["comparison"]["partial_f"];
        assert!(close(
            f.f_statistic,
            theirs["f_statistic"].as_f64().expect("F")
        ));
        assert!(close(f.p_value, theirs["p_value"].as_f64().expect("p")));
        assert!(close(
            c.kept.aic,
            cli["comparison"]["other"]["aic"].as_f64().expect("AIC")
        ));
    };
    check(&wb);
    let session = dir.path().join("jar.plumb");
    wb.apply(Action::SaveSessionTo(session.clone()));
    let mut again = Workbench::new(Some(dir.path().join("other-config")));
    again.apply(Action::Open(session));
    settle(&mut again);
    assert_eq!(again.bench().pair().map(|p| p.spec.clone()), Some(curve));
    check(&again);
    again.apply(Action::KeepForComparison(false));
    settle(&mut again);
    let d = again.bench().diagnostics().expect("diagnostics");
    assert!(d.kept.is_none() && again.bench().kept().is_none());
}

#[test]
fn residuals_can_be_drawn_against_the_row_order_or_any_numeric_column() {
    use plumb_app::state::diagnostics::ResidualAxis;
    let dir = tempfile::tempdir().expect("dir");
    let mut wb = Workbench::new(Some(dir.path().to_path_buf()));
    let data = demo("calibration-run.csv");
    wb.apply(Action::Open(data.clone()));
    settle(&mut wb);
    wb.apply(Action::OpenPair(FitSpec::line(
        "absorbance",
        "standard_mg_l",
    )));
    settle(&mut wb);
    exclude(&mut wb, 3);
    wb.apply(Action::ResidualsAgainst(ResidualAxis::Column(
        "lamp_hours".into(),
    )));
    settle(&mut wb);
    let d = wb.bench().diagnostics().expect("diagnostics");
    assert_eq!(
        d.views.residual_axis,
        ResidualAxis::Column("lamp_hours".into())
    );
    // Independent reading of the file: the lamp hours of each included row, by data row.
    let text = std::fs::read_to_string(&data).expect("read");
    let hours: Vec<f64> = text
        .lines()
        .skip(1)
        .map(|l| {
            l.split(',')
                .nth(4)
                .expect("lamp_hours")
                .parse()
                .expect("number")
        })
        .collect();
    let rows_of = wb.bench().pair().expect("pair").rows.clone();
    let cloud = &d.views.residual;
    assert_eq!(cloud.points.len(), live(&wb).n);
    for (&(x, e), &entry) in cloud.points.iter().zip(cloud.entries.iter()) {
        let row = rows_of[entry];
        assert_eq!(x, hours[row - 1], "row {row}");
        let k = d
            .included
            .iter()
            .position(|&i| i == entry)
            .expect("included");
        assert_eq!(e, d.cases.get(k).expect("a case").residual);
    }
    assert_eq!(
        d.views.excluded_residuals.entries.len(),
        1,
        "row 3 as a ring"
    );
    wb.apply(Action::ResidualsAgainst(ResidualAxis::RowOrder));
    settle(&mut wb);
    let d = wb.bench().diagnostics().expect("diagnostics");
    let rows: Vec<f64> = d
        .views
        .residual
        .entries
        .iter()
        .map(|&e| rows_of[e] as f64)
        .collect();
    let xs: Vec<f64> = d.views.residual.points.iter().map(|p| p.0).collect();
    assert_eq!(xs, rows);
}
