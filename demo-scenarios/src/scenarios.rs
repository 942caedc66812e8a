//! The scenarios themselves. All numbers are invented; the stories are ours.

use std::fmt::Write as _;
use std::io::Write as _;
use std::path::{Path, PathBuf};

use rand::{Rng, SeedableRng};
use rand_chacha::ChaCha8Rng;
use rand_distr::{Distribution, Normal};

/// Seed of every scenario (each adds its own offset).
pub const SEED: u64 = 20_261_202;

/// Writes every scenario into `dir` and returns the paths written.
pub fn write_all(dir: &Path) -> std::io::Result<Vec<PathBuf>> {
    std::fs::create_dir_all(dir)?;
    let mut written = Vec::new();
    for (name, text) in all() {
        let path = dir.join(name);
        write_atomically(&path, text.as_bytes())?;
        written.push(path);
    }
    Ok(written)
}

/// Every scenario: file name and contents.
pub fn all() -> Vec<(&'static str, String)> {
    vec![
        ("jar-tests.csv", jar_tests()),
        ("calibration-run.csv", calibration_run()),
        ("field-survey.csv", field_survey()),
        (
            "calibration-unknowns.csv",
            crate::lab::calibration_unknowns(),
        ),
        ("trace-copper.csv", crate::lab::trace_copper()),
        ("chlorine-meters.csv", crate::lab::chlorine_meters()),
    ]
}

fn write_atomically(path: &Path, bytes: &[u8]) -> std::io::Result<()> {
    let tmp = path.with_extension("tmp");
    {
        let mut f = std::fs::File::create(&tmp)?;
        f.write_all(bytes)?;
        f.sync_all()?;
    }
    std::fs::rename(tmp, path)
}

pub(crate) fn normal(sd: f64) -> Normal<f64> {
    Normal::new(0.0, sd).expect("positive standard deviation")
}

/// Jar tests at a small river-water treatment works: six jars per morning over eight mornings,
/// coagulant dose against settled turbidity. The response flattens out at high dose (curved),
/// and two rows were keyed in with a slipped decimal point. Exported the way the bench
/// spreadsheet does it: semicolons, decimal commas.
pub fn jar_tests() -> String {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 1);
    let mut out = String::from("jar;morning;dose_mg_l;raw_ntu;settled_ntu;ph;analyst\n");
    let analysts = ["IK", "MB", "TS"];
    let doses = [8.0, 14.0, 20.0, 26.0, 32.0, 40.0];
    let mut jar = 0;
    for morning in 1..=8 {
        let raw: f64 = 38.0 + 6.0 * (morning as f64 * 0.9).sin() + normal(1.5).sample(&mut rng);
        let analyst = analysts[morning % 3];
        for &base_dose in &doses {
            jar += 1;
            let dose: f64 = base_dose + rng.random_range(-1.0..1.0);
            let settled =
                1.6 + raw * 0.55 * (-dose / 9.5).exp() * (1.0 + normal(0.06).sample(&mut rng));
            let ph = 7.6 - 0.012 * dose + normal(0.04).sample(&mut rng);
            let mut settled_text = comma(settled, 2);
            if jar == 17 || jar == 38 {
                settled_text = comma(settled * 10.0, 1); // the slipped decimal point
            }
            let _ = writeln!(
                out,
                "J{jar:02};{morning};{};{};{settled_text};{};{analyst}",
                comma(dose, 1),
                comma(raw, 1),
                comma(ph, 2)
            );
        }
    }
    out
}

/// A calibration run on a benchtop photometer: nine standards in triplicate, read in random
/// order. The 25 mg/L standard had been left uncapped and reads high in all three replicates.
pub fn calibration_run() -> String {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 2);
    let standards = [0.0, 2.0, 5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 40.0];
    let mut runs: Vec<(f64, u32)> = standards
        .iter()
        .flat_map(|&c| (1..=3).map(move |r| (c, r)))
        .collect();
    for i in (1..runs.len()).rev() {
        let j = rng.random_range(0..=i);
        runs.swap(i, j);
    }
    let mut out = String::from("read_order,standard_mg_l,replicate,absorbance,lamp_hours\n");
    for (k, (conc, rep)) in runs.iter().enumerate() {
        let drift = if *conc == 25.0 { 0.045 } else { 0.0 };
        let absorbance = 0.004 + 0.0213 * conc + drift + normal(0.0035).sample(&mut rng);
        let lamp = 1412.0 + 0.05 * k as f64;
        let _ = writeln!(out, "{},{conc:.1},{rep},{absorbance:.4},{lamp:.2}", k + 1);
    }
    out
}

/// A meadow survey: 160 quadrats visited over one growing season in the order they were
/// walked (`visit_day`). Sward height and soil temperature both climb through the season, so
/// they correlate strongly without either driving the other; leaf nitrogen and leaf water sit
/// on a ring (two leaf types, sampled on either side of a mid-season cut), so their Pearson r
/// is near zero although the two are far from independent. The other traits are ordinary.
pub fn field_survey() -> String {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 3);
    let mut out = String::from(
        "quadrat,visit_day,sward_height_cm,soil_temp_c,leaf_n_pct,leaf_water_pct,species_count,slope_deg\n",
    );
    for q in 1..=160u32 {
        let day = 1.0 + f64::from(q - 1) * 0.9 + rng.random_range(0.0..0.8);
        let season = day / 145.0;
        let height = 8.0 + 30.0 * season + normal(3.0).sample(&mut rng);
        let temp = 9.0 + 8.0 * season + normal(0.9).sample(&mut rng);
        let angle = rng.random_range(0.0..std::f64::consts::TAU);
        let leaf_n = 2.6 + 0.45 * angle.cos() + normal(0.04).sample(&mut rng);
        let leaf_water = 71.0 + 4.0 * angle.sin() + normal(0.35).sample(&mut rng);
        let slope = rng.random_range(0.0..18.0f64);
        let species = (14.0 - 0.3 * slope + normal(2.0).sample(&mut rng))
            .round()
            .max(2.0);
        let _ = writeln!(
            out,
            "Q{q:03},{day:.1},{height:.1},{temp:.2},{leaf_n:.3},{leaf_water:.2},{species},{slope:.1}"
        );
    }
    out
}

/// Rows of the large scenario.
pub const SENSOR_ROWS: usize = 1_000_000;

/// A pump-station sensor log of `rows` rows (one reading every 30 s; a million rows is about a
/// year), for the scale path. Motor current follows flow with a gentle curve,
/// bearing temperature drifts up with running hours and with the weather, and a stuck
/// humidity probe repeats its last value for one stretch. Written on demand
/// (`cargo run -p plumb-demo -- --large`), not committed: about 38 MB.
pub fn sensor_log(rows: usize, out: &mut impl std::io::Write) -> std::io::Result<()> {
    let mut rng = ChaCha8Rng::seed_from_u64(SEED + 4);
    writeln!(
        out,
        "t_s,flow_l_s,motor_current_a,bearing_temp_c,ambient_c,humidity_pct"
    )?;
    let mut humidity: f64 = 60.0;
    let stuck = (rows / 3)..(rows / 3 + rows / 50);
    for i in 0..rows {
        let t = i as f64 * 30.0;
        let day = t / 86_400.0;
        let ambient = 12.0
            + 8.0 * (day / 365.0 * std::f64::consts::TAU).sin()
            + 4.0 * (day * std::f64::consts::TAU).sin()
            + normal(0.4).sample(&mut rng);
        let flow = 40.0 + 15.0 * (day * 3.1).sin().abs() + normal(1.5).sample(&mut rng);
        let current = 6.0 + 0.18 * flow + 0.0009 * flow * flow + normal(0.25).sample(&mut rng);
        let bearing =
            35.0 + 0.4 * ambient + 0.02 * day + 0.05 * current + normal(0.3).sample(&mut rng);
        if !stuck.contains(&i) {
            humidity = (humidity + normal(0.3).sample(&mut rng)).clamp(20.0, 99.0);
        }
        writeln!(
            out,
            "{t:.0},{flow:.2},{current:.3},{bearing:.2},{ambient:.2},{humidity:.1}"
        )?;
    }
    Ok(())
}

fn comma(v: f64, decimals: usize) -> String {
    format!("{v:.decimals$}").replace('.', ",")
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn committed_files_match_the_generator() {
        // The files in data/ must be what this seed produces; regenerate with
        // `cargo run -p plumb-demo` after changing a scenario.
        let dir = Path::new(env!("CARGO_MANIFEST_DIR")).join("data");
        for (name, text) in all() {
            let committed =
                std::fs::read_to_string(dir.join(name)).expect("committed scenario file");
            assert!(
                committed == text,
                "{name} differs from the generator's output"
            );
        }
    }

    #[test]
    fn the_sensor_log_is_reproducible_and_well_formed() {
        let mut a = Vec::new();
        let mut b = Vec::new();
        sensor_log(2_000, &mut a).expect("in memory");
        sensor_log(2_000, &mut b).expect("in memory");
        assert_eq!(a, b);
        let text = String::from_utf8(a).expect("utf-8");
        assert_eq!(text.lines().count(), 2_001);
        assert!(text.lines().all(|l| l.split(',').count() == 6));
    }

    #[test]
    fn jar_tests_have_the_two_slipped_rows() {
        let text = jar_tests();
        let settled: Vec<f64> = text
            .lines()
            .skip(1)
            .map(|l| {
                l.split(';')
                    .nth(4)
                    .expect("five fields")
                    .replace(',', ".")
                    .parse()
                    .expect("number")
            })
            .collect();
        assert_eq!(settled.len(), 48);
        // Compare each jar with the median of the jars dosed alike on the other mornings.
        for (i, &v) in settled.iter().enumerate() {
            let mut alike: Vec<f64> = (i % 6..48).step_by(6).map(|k| settled[k]).collect();
            alike.sort_by(f64::total_cmp);
            let median = alike[alike.len() / 2];
            let slipped = i + 1 == 17 || i + 1 == 38;
            assert_eq!(
                v > 4.0 * median,
                slipped,
                "jar {}: {v} against median {median}",
                i + 1
            );
        }
    }
}
