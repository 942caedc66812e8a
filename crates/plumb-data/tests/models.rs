//! Model building through the analysis route: a grouping factor with its tests and table,
//! transforms (with their domain reported by row), Box–Cox, the added-variable views and two
//! fits side by side. Each check compares against an independent computation in the test:
//! a separate fit per group, the transformed column fitted directly, the identity between
//! partial F and a t², or the Frisch–Waugh–Lovell slope.

use plumb_core::regression::{fit, Design, FitOptions, Transform};
use plumb_data::analysis::{analyze, compare, Factor, FitRequest, ResponseScale, Wanted};
use plumb_data::{load, LoadOptions, Table};

const NAMES: [&str; 2] = ["the kept model", "the current one"];

/// Three sites with lines of their own: slopes 1.5, 1.5 and 2.4, intercepts 2, 5, 1.
fn sites() -> (tempfile::TempDir, Table) {
    let dir = tempfile::tempdir().expect("dir");
    let path = dir.path().join("sites.csv");
    let mut text = String::from("dose,resp,site,w\n");
    for i in 0..60 {
        let site = ["north", "south", "east"][i % 3];
        let x = 1.0 + (i / 3) as f64 * 0.5;
        let (a, b) = match site {
            "north" => (2.0, 1.5),
            "south" => (5.0, 1.5),
            _ => (1.0, 2.4),
        };
        let wobble = ((i * 7919) % 17) as f64 / 17.0 - 0.5;
        text.push_str(&format!(
            "{x},{},{site},{}\n",
            a + b * x + wobble,
            1 + i % 4
        ));
    }
    text.push_str("3.0,9.0,,1\n"); // a row with no site: dropped when grouping
    std::fs::write(&path, text).expect("write");
    let t = load(&path, &LoadOptions::default()).expect("load");
    (dir, t)
}

fn grouped(separate: bool) -> FitRequest {
    FitRequest {
        y: "resp".into(),
        x: vec!["dose".into()],
        factor: Some(Factor {
            column: "site".into(),
            reference: Some("north".into()),
            separate_slopes: separate,
        }),
        ..FitRequest::default()
    }
}

#[test]
fn a_factor_enters_against_its_reference_and_each_group_gets_its_own_slope() {
    let (_dir, t) = sites();
    let a = analyze(&t, &grouped(true), Wanted::default()).expect("fits");
    let names: Vec<&str> = a.fit.coefficients.iter().map(|c| c.term.as_str()).collect();
    assert_eq!(
        names,
        [
            "intercept",
            "dose",
            "site=east",
            "site=south",
            "dose×site=east",
            "dose×site=south"
        ]
    );
    assert_eq!(a.fit.n, 60, "the row without a site is dropped");
    assert!(a
        .selection()
        .dropped
        .iter()
        .any(|d| d.row == 61 && d.column == "site"));
    let g = a.groups.expect("group tests");
    assert_eq!(g.table.iter().map(|r| r.n).sum::<usize>(), 60);
    // Each group's slope from the joint fit equals that group's own straight line (the
    // separate-lines model fits each group's line exactly; only σ̂ is pooled).
    for row in &g.table {
        let rows: Vec<usize> = (1..=60)
            .filter(|r| ["north", "south", "east"][(r - 1) % 3] != row.level)
            .collect();
        let own = analyze(
            &t,
            &FitRequest {
                y: "resp".into(),
                x: vec!["dose".into()],
                exclude: rows.into_iter().chain([61]).collect(),
                ..FitRequest::default()
            },
            Wanted::default(),
        )
        .expect("one group");
        let slope = own.fit.coefficients[1].estimate;
        assert!(
            (row.slope.estimate - slope).abs() < 1e-10,
            "{}: {} vs {slope}",
            row.level,
            row.slope.estimate
        );
    }
    assert!(
        g.equal_slopes.p_value < 1e-6,
        "east's slope differs: {:?}",
        g.equal_slopes
    );
    assert_eq!((g.equal_slopes.df_num, g.common_line.df_num), (2, 4));
}

#[test]
fn parallel_lines_have_the_groups_tests_and_a_clear_message_for_a_thin_level() {
    let (_dir, t) = sites();
    let a = analyze(&t, &grouped(false), Wanted::default()).expect("fits");
    assert_eq!(a.fit.coefficients.len(), 4);
    let g = a.groups.expect("tests");
    // With one added slope term per non-reference level the partial F has 2 df; with a
    // single extra term it would be t² (checked in plumb-core).
    assert_eq!(g.equal_slopes.df_num, 2);
    let mut thin = grouped(true);
    thin.exclude = (1..=60).filter(|r| r % 3 == 0 && *r > 6).collect();
    let e = analyze(&t, &thin, Wanted::default()).expect_err("east has 2 rows");
    let text = e.to_string();
    assert!(
        text.contains("level 'east'") && text.contains("2 rows on the rows used"),
        "{text}"
    );
    let mut missing = grouped(false);
    missing.factor.as_mut().expect("factor").reference = Some("west".into());
    let e = analyze(&t, &missing, Wanted::default()).expect_err("no west");
    assert!(e.to_string().contains("levels: east, north, south"), "{e}");
}

#[test]
fn a_transformed_response_is_fitted_on_its_scale_and_drawn_back_in_its_units() {
    let (_dir, t) = sites();
    let mut request = FitRequest {
        y: "resp".into(),
        x: vec!["dose".into()],
        response: ResponseScale::Fixed(Transform::Ln),
        x_transforms: vec![("dose".into(), Transform::Sqrt)],
        ..FitRequest::default()
    };
    let wanted = Wanted {
        extras: Some(Default::default()),
        ..Wanted::default()
    };
    let a = analyze(&t, &request, wanted).expect("positive");
    assert_eq!(a.response_label("resp"), "ln(resp)");
    assert_eq!(a.fit.coefficients[1].term, "sqrt(dose)");
    // The same fit, built by hand from the transformed columns.
    let sel = a.selection();
    let ly: Vec<f64> = sel.columns[0].iter().map(|v| v.ln()).collect();
    let sx: Vec<f64> = sel.columns[1].iter().map(|v| v.sqrt()).collect();
    let direct = fit(
        &Design::linear(&[("s", &sx)], true),
        &ly,
        None,
        &FitOptions::default(),
    )
    .expect("fits");
    assert!((direct.r_squared - a.fit.r_squared).abs() < 1e-13);
    let curve = a.extras.expect("extras").bands().to_vec();
    let p = curve[10];
    let expected =
        (direct.coefficients[0].estimate + direct.coefficients[1].estimate * p.x.sqrt()).exp();
    assert!(
        (p.fitted - expected).abs() < 1e-10 * expected,
        "back in the response's units"
    );
    assert!(p.mean_low < p.fitted && p.fitted < p.mean_high);
    // A value the transform cannot take is reported by row, not dropped.
    request.response = ResponseScale::Fixed(Transform::Reciprocal);
    request.x_transforms = vec![("dose".into(), Transform::Log10)];
    request.exclude = vec![];
    let dir = tempfile::tempdir().expect("dir");
    let path = dir.path().join("z.csv");
    std::fs::write(&path, "dose,resp\n0,1\n1,2\n2,3\n-1,4\n3,5\n").expect("write");
    let z = load(&path, &LoadOptions::default()).expect("load");
    let e = analyze(&z, &request, Wanted::default()).expect_err("log of 0");
    let text = e.to_string();
    assert!(
        text.contains("2 rows are not positive") && text.contains("rows 1, 4"),
        "{text}"
    );
}

#[test]
fn box_cox_estimates_lambda_for_the_model_and_fits_on_that_scale() {
    let (_dir, t) = sites();
    let request = FitRequest {
        y: "resp".into(),
        x: vec!["dose".into()],
        response: ResponseScale::BoxCox,
        exclude: vec![61],
        ..FitRequest::default()
    };
    let a = analyze(&t, &request, Wanted::default()).expect("positive");
    let b = a.rows.boxcox.expect("λ estimated");
    assert!(b.interval.0.is_some_and(|lo| lo < b.lambda));
    assert!(a.response_label("resp").starts_with("boxcox["));
    // λ̂ maximizes the profile likelihood: nudging it either way lowers ℓ.
    let design = &a.rows.design;
    let y = &a.selection().columns[0];
    let at = |l: f64| plumb_core::regression::boxcox_log_likelihood(design, y, l).expect("ℓ");
    assert!(at(b.lambda) >= at(b.lambda + 1e-3) && at(b.lambda) >= at(b.lambda - 1e-3));
}

#[test]
fn added_variable_slopes_are_the_coefficients_and_comparisons_test_nested_models() {
    let (_dir, t) = sites();
    let two = FitRequest {
        y: "resp".into(),
        x: vec!["dose".into(), "w".into()],
        exclude: vec![61],
        ..FitRequest::default()
    };
    let wanted = Wanted {
        added_variables: true,
        ..Wanted::default()
    };
    let a = analyze(&t, &two, wanted).expect("fits");
    assert_eq!(a.added.len(), 2);
    for (av, c) in a.added.iter().zip(&a.fit.coefficients[1..]) {
        assert_eq!(av.term, c.term);
        assert!((av.slope - c.estimate).abs() < 1e-10 * c.estimate.abs().max(1.0));
    }
    let one = FitRequest {
        x: vec!["dose".into()],
        ..two.clone()
    };
    let c = compare(&t, &one, &two, NAMES).expect("both fit");
    let f = c.nested.expect("nested on the same rows");
    // One added term: the partial F is the square of its t (textbook identity).
    assert!((f.f_statistic - a.fit.coefficients[2].t.powi(2)).abs() < 1e-8 * f.f_statistic);
    assert!(c.note.contains("the kept model is nested"), "{}", c.note);
    let logged = FitRequest {
        response: ResponseScale::Fixed(Transform::Ln),
        ..two.clone()
    };
    let c = compare(&t, &one, &logged, NAMES).expect("both fit");
    assert!(
        c.nested.is_none() && c.note.contains("different scales"),
        "{}",
        c.note
    );
    let fewer_rows = FitRequest {
        exclude: vec![61, 5],
        ..two
    };
    let c = compare(&t, &one, &fewer_rows, NAMES).expect("both fit");
    assert!(
        c.nested.is_none() && c.note.contains("not on the same rows"),
        "{}",
        c.note
    );
}

#[test]
fn the_ladder_suggests_the_square_for_a_bend_and_nothing_for_a_line() {
    let dir = tempfile::tempdir().expect("dir");
    let path = dir.path().join("bend.csv");
    let mut text = String::from("x,bent,straight\n");
    for i in 0..40 {
        let x = f64::from(i) * 0.25;
        let wobble = f64::from((i * 7919) % 13) / 13.0 - 0.5;
        text.push_str(&format!(
            "{x},{},{}\n",
            3.0 + 2.0 * x - 0.6 * x * x + 0.3 * wobble,
            3.0 + 2.0 * x + 0.3 * wobble
        ));
    }
    std::fs::write(&path, text).expect("write");
    let t = load(&path, &LoadOptions::default()).expect("load");
    let wanted = Wanted {
        extras: Some(Default::default()),
        ..Wanted::default()
    };
    let suggested = |y: &str| {
        let request = FitRequest {
            y: y.into(),
            x: vec!["x".into()],
            ..FitRequest::default()
        };
        let a = analyze(&t, &request, wanted).expect("fits");
        let e = a.extras.expect("extras");
        // Independent reading of the same ladder: the square's partial F p-value.
        let square = e.degrees[1].versus_previous.expect("tested").p_value;
        (e.suggested_degree(), square)
    };
    let (bent, p_square) = suggested("bent");
    assert_eq!(bent, 2, "a parabola with small noise: the square is needed");
    assert!(p_square < plumb_data::analysis::POWER_STEP_P);
    let (straight, p_square) = suggested("straight");
    assert_eq!(straight, 1, "a line: p for the square is {p_square}");
}

#[test]
fn the_ladders_line_is_the_same_whether_taken_from_the_model_or_fitted_afresh() {
    let dir = tempfile::tempdir().expect("dir");
    let path = dir.path().join("line.csv");
    let mut text = String::from("x,y\n");
    for i in 1..=60 {
        let x = f64::from(i) * 0.5;
        let wobble = f64::from((i * 7919) % 17) / 17.0 - 0.5;
        text.push_str(&format!("{x},{}\n", 1.0 + 0.8 * x + wobble * x / 10.0));
    }
    std::fs::write(&path, text).expect("write");
    let t = load(&path, &LoadOptions::default()).expect("load");
    let numbers =
        |name: &str| -> Vec<f64> { t.numeric(name).expect("numeric").iter().flatten().collect() };
    let (x, y) = (numbers("x"), numbers("y"));
    let fresh = fit(
        &Design::linear(&[("x", &x)], true),
        &y,
        None,
        &FitOptions::default(),
    )
    .expect("fits");
    let wanted = Wanted {
        extras: Some(Default::default()),
        ..Wanted::default()
    };
    // Unweighted: the model's own fit is the ladder's line. Weighted by a rule: the model is
    // weighted, the ladder's line is not, so it must not be the model's.
    for rule in [None, Some(plumb_core::calibration::WeightRule::InverseX2)] {
        let request = FitRequest {
            y: "y".into(),
            x: vec!["x".into()],
            weight_rule: rule,
            ..FitRequest::default()
        };
        let a = analyze(&t, &request, wanted).expect("fits");
        let line = &a.extras.expect("extras").degrees[0].fit;
        assert_eq!(line.coefficients, fresh.coefficients, "{rule:?}");
        assert_eq!(
            line.r_squared.to_bits(),
            fresh.r_squared.to_bits(),
            "{rule:?}"
        );
        if rule.is_some() {
            assert_ne!(a.fit.coefficients, fresh.coefficients, "weighted model");
        }
    }
}
