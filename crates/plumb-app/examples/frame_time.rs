//! Frame-time benchmark of the workbench (CPU side: our drawing code, egui's layout and its
//! tessellation into triangles; not the GPU upload and draw).
//!
//! ```text
//! cargo run --release -p plumb-app --example frame_time -- DATA Y X [FRAMES]
//! ```
//!
//! Opens DATA, puts Y against X on the pair bench, waits for the diagnostics, then draws
//! FRAMES frames (default 240) with the pointer sweeping across the scatter (hover lookup,
//! tooltip, focus ring in every view), and prints the median, 95th percentile and worst frame.
//! Then it measures the frames around one exclusion (the live update on the UI thread, the
//! diagnostics on a worker).

use std::time::{Duration, Instant};

use eframe::egui;
use plumb_app::{Action, FitSpec, Screen, Workbench};

fn frame(ctx: &egui::Context, wb: &mut Workbench, events: Vec<egui::Event>) -> Duration {
    let input = egui::RawInput {
        screen_rect: Some(egui::Rect::from_min_size(
            egui::Pos2::ZERO,
            egui::vec2(1440.0, 900.0),
        )),
        events,
        ..Default::default()
    };
    let start = Instant::now();
    let out = ctx.run_ui(input, |ui| wb.show(ui));
    let _triangles = ctx.tessellate(out.shapes, out.pixels_per_point);
    start.elapsed()
}

fn settle(ctx: &egui::Context, wb: &mut Workbench) {
    let start = Instant::now();
    while wb.is_busy() && start.elapsed() < Duration::from_secs(600) {
        frame(ctx, wb, Vec::new());
        std::thread::sleep(Duration::from_millis(20));
    }
    for _ in 0..3 {
        frame(ctx, wb, Vec::new());
    }
}

/// Resident memory now and at its peak so far, from `/proc/self/status` (Linux; empty
/// elsewhere), so that each phase's share of the peak can be read off.
fn memory() -> String {
    let status = std::fs::read_to_string("/proc/self/status").unwrap_or_default();
    let field = |name: &str| {
        status
            .lines()
            .find_map(|l| l.strip_prefix(name))
            .and_then(|v| v.trim().strip_suffix("kB"))
            .and_then(|v| v.trim().parse::<f64>().ok())
            .map_or_else(|| "?".to_string(), |kb| format!("{:.0} MiB", kb / 1024.0))
    };
    if status.is_empty() {
        String::new()
    } else {
        format!(" [resident {}, peak {}]", field("VmRSS:"), field("VmHWM:"))
    }
}

fn report(label: &str, mut times: Vec<Duration>) {
    times.sort();
    let ms = |d: Duration| d.as_secs_f64() * 1e3;
    let pick = |q: f64| times[((times.len() - 1) as f64 * q).round() as usize];
    println!(
        "{label}: {} frames, median {:.2} ms, p95 {:.2} ms, worst {:.2} ms",
        times.len(),
        ms(pick(0.5)),
        ms(pick(0.95)),
        ms(*times.last().expect("frames"))
    );
}

fn main() {
    let args: Vec<String> = std::env::args().skip(1).collect();
    let [data, y, x, rest @ ..] = args.as_slice() else {
        eprintln!("usage: frame_time DATA Y X [FRAMES]");
        std::process::exit(2);
    };
    let frames: usize = rest.first().and_then(|f| f.parse().ok()).unwrap_or(240);
    let ctx = egui::Context::default();
    let mut wb = Workbench::new(None);
    let t0 = Instant::now();
    wb.apply(Action::Open(data.into()));
    while wb.is_loading() {
        wb.poll();
        std::thread::sleep(Duration::from_millis(20));
    }
    let Some(loaded) = wb.loaded() else {
        eprintln!("{}", wb.status().map_or("load failed", |s| s.text.as_str()));
        std::process::exit(1);
    };
    let rows = loaded.dataset.table.n_rows();
    println!(
        "loaded {rows} rows in {:.2} s{}",
        t0.elapsed().as_secs_f64(),
        memory()
    );
    let t1 = Instant::now();
    wb.apply(Action::OpenPair(FitSpec::line(y, x)));
    wb.apply(Action::Show(Screen::Bench));
    while wb.bench().is_opening() {
        wb.poll();
        std::thread::sleep(Duration::from_millis(5));
    }
    assert!(wb.bench().pair().is_some(), "pair opens: {:?}", wb.status());
    println!(
        "pair opened on a worker (rows, live fit and hover index) in {:.3} s{}",
        t1.elapsed().as_secs_f64(),
        memory()
    );
    let t2 = Instant::now();
    settle(&ctx, &mut wb);
    println!(
        "diagnostics ready after {:.2} s{}",
        t2.elapsed().as_secs_f64(),
        memory()
    );

    let t = wb.scatter_transform().expect("scatter drawn");
    let r = t.frame();
    let sweep: Vec<egui::Pos2> = (0..frames)
        .map(|k| {
            let f = k as f32 / frames as f32;
            egui::pos2(
                r.left() + r.width() * f,
                r.top() + r.height() * (0.5 + 0.4 * (f * 12.0).sin()),
            )
        })
        .collect();
    let times = sweep
        .iter()
        .map(|&p| frame(&ctx, &mut wb, vec![egui::Event::PointerMoved(p)]))
        .collect();
    report("hover sweep over the scatter", times);

    let still = (0..frames)
        .map(|_| frame(&ctx, &mut wb, Vec::new()))
        .collect();
    report("idle frames", still);

    let first_row = wb.bench().pair().expect("pair").rows[0];
    let t3 = Instant::now();
    wb.apply(Action::Exclude {
        rows: vec![first_row],
        reason: Some("benchmark".into()),
    });
    let update = t3.elapsed();
    let after: Vec<Duration> = (0..30).map(|_| frame(&ctx, &mut wb, Vec::new())).collect();
    println!(
        "one exclusion on the UI thread (live update): {:.3} ms",
        update.as_secs_f64() * 1e3
    );
    report("frames while the diagnostics recompute", after);
    let t4 = Instant::now();
    settle(&ctx, &mut wb);
    println!(
        "diagnostics after the exclusion ready in {:.2} s{}",
        t4.elapsed().as_secs_f64(),
        memory()
    );
    model_change(&ctx, &mut wb);
}

/// Adds the file's other numeric columns as predictors and times the frames drawn while the
/// worker refits (the model on the bench stays live).
fn model_change(ctx: &egui::Context, wb: &mut Workbench) {
    let Some(spec) = wb.bench().spec().cloned() else {
        return;
    };
    let numeric = wb
        .loaded()
        .map(|l| l.dataset.numeric.clone())
        .unwrap_or_default();
    let mut next = spec.clone();
    next.x.extend(
        numeric
            .into_iter()
            .filter(|c| *c != spec.y && !spec.x.contains(c)),
    );
    let t = Instant::now();
    wb.apply(Action::OpenPair(next.clone()));
    let mut frames = Vec::new();
    while wb.bench().pair().is_some_and(|p| p.spec != next) && wb.bench().is_opening() {
        frames.push(frame(ctx, wb, Vec::new()));
    }
    println!(
        "model changed to {} terms: refitted on a worker in {:.2} s{}",
        wb.bench().pair().map_or(0, |p| p.terms.len()),
        t.elapsed().as_secs_f64(),
        memory()
    );
    if !frames.is_empty() {
        report("frames drawn during that refit", frames);
    }
}
