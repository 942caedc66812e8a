//! The lab bench's second day: unknowns for the photometer run, a wide-range trace-metal
//! calibration whose spread grows with concentration, and two chlorine methods compared on
//! the same samples. All numbers are invented; the stories are ours.

use std::fmt::Write as _;

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rand_distr::Distribution;

use crate::scenarios::{normal, SEED};

/// Samples read on the photometer after the calibration run (`calibration-run.csv`), in
/// duplicate or triplicate: two river samples, a spiked blank, a tank sample above the top
/// standard, and a field blank near the limit of detection.
pub fn calibration_unknowns() -> String {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 5);
    let samples: [(&str, f64, u32); 5] = [
        ("river-north", 12.6, 3),
        ("river-south", 7.9, 3),
        ("spiked-blank", 20.0, 2),
        ("tank-3", 47.0, 2),
        ("field-blank", 0.4, 3),
    ];
    let mut out = String::from("sample,absorbance\n");
    for (name, conc, reps) in samples {
        for _ in 0..reps {
            let a = 0.004 + 0.0213 * conc + normal(0.0035).sample(&mut rng);
            let _ = writeln!(out, "{name},{a:.4}");
        }
    }
    out
}

/// Copper in plating-line rinse water on an emission spectrometer: eight standards from 0.5 to
/// 200 µg/L in triplicate, read in random order. The noise is mostly proportional to the
/// signal (about 2.5 %) over a small constant floor, so the unweighted line is ruled by the top
/// standards and reads the low ones poorly: the case for weighting.
pub fn trace_copper() -> String {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 6);
    let standards = [0.5, 1.0, 2.0, 5.0, 10.0, 20.0, 50.0, 100.0, 200.0];
    let mut runs: Vec<(f64, u32)> = standards
        .iter()
        .flat_map(|&c| (1..=3).map(move |r| (c, r)))
        .collect();
    for i in (1..runs.len()).rev() {
        let j = rng.random_range(0..=i);
        runs.swap(i, j);
    }
    let mut out = String::from("run,copper_ug_l,replicate,counts\n");
    for (k, (conc, rep)) in runs.iter().enumerate() {
        let signal = 140.0 + 912.0 * conc;
        let counts =
            signal * (1.0 + normal(0.025).sample(&mut rng)) + normal(12.0).sample(&mut rng);
        let _ = writeln!(out, "{},{conc},{rep},{counts:.0}", k + 1);
    }
    out
}

/// Free chlorine in 64 drinking-water samples by the laboratory's photometric method
/// (`lab_mg_l`) and a new handheld meter (`meter_mg_l`). The meter reads about 5 % high with a
/// small offset, its scatter grows with the level, and two samples were read through a
/// bubble-filled cuvette (the meter's value is low).
pub fn chlorine_meters() -> String {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 7);
    let mut out = String::from("sample,site,lab_mg_l,meter_mg_l\n");
    let sites = ["works", "reservoir", "network"];
    for s in 1..=64u32 {
        let truth: f64 = 0.08 + 3.6 * rng.random::<f64>().powf(1.4);
        let lab = truth + normal(0.02 + 0.015 * truth).sample(&mut rng);
        let mut meter = 0.03 + 1.05 * truth + normal(0.03 + 0.03 * truth).sample(&mut rng);
        if s == 23 || s == 51 {
            meter *= 0.7;
        }
        let site = sites[(s as usize * 7) % 3];
        let _ = writeln!(
            out,
            "W{s:02},{site},{:.2},{:.2}",
            lab.max(0.0),
            meter.max(0.0)
        );
    }
    out
}
