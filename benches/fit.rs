//! Speed of the least-squares fitter, on the committed invented data sets of
//! tests/reference/scipy_fit/data:
//!
//! - `gab_15`: GAB isotherm, 15 points, one start `[0.07, 10, 0.85]` (the same
//!   work scipy's `curve_fit` does in benches/fit_compare.py);
//! - `gab_15_with_starts`: `fit_isotherm`, siccant's full route (start values
//!   from the linearised form and typical values, most promising first);
//! - `page_300`: Page drying model `MR = exp(-k t^n)`, 300 points, start
//!   `[0.01, 1]`, derivatives by finite differences (as scipy does);
//! - `page_300_gradient`: the same with analytic derivatives and `ln t`
//!   computed once (`least_squares_with_gradient`), as a model file would;
//! - `page_300_thin_layer`: `fit_thin_layer`, siccant's full route for the
//!   Page model (start from the linearised form `ln(-ln MR) = ln k + n ln t`,
//!   analytic derivatives evaluated by one vectorised loop, a fit on time
//!   scaled by the last reading, then parameters and covariance converted
//!   to minutes).
//!
//! `cargo bench --bench fit` runs criterion (wall-clock time). With
//! `FIT_CPU_TIMING=1` it instead prints the fitted parameters and the CPU time
//! per fit (process CPU clock, fair when other jobs share the machine), which
//! benches/fit_compare.py compares with scipy in one run (`FIT_CASE=name`
//! times one case only, for profiling; `FIT_REPS=n` repeats each case exactly
//! `n` times in one round, so that instruction counts under callgrind are
//! repeatable: the difference of two counts over the difference of `n` is
//! the count per fit). The vectorised loops of the fitter pick AVX-512, AVX2
//! or baseline instructions at run time; valgrind has no AVX-512, so counts
//! under callgrind are of the AVX2 form even where native runs use AVX-512.
//! Target: at least 20 times faster than scipy, parameters within 0.5 %.

use std::hint::black_box;
use std::path::Path;

use criterion::Criterion;
use siccant::engine::fit::{least_squares, least_squares_with_gradient, unbounded, FitResult};
use siccant::engine::sorption::{fit_isotherm, IsothermKind};
use siccant::engine::thin_layer::{fit_thin_layer, ThinLayerModel};
use siccant::library::data::read_table;
use siccant::value::Value;

fn column(file: &str, name: &str) -> Vec<f64> {
    let path = Path::new(env!("CARGO_MANIFEST_DIR"))
        .join("tests/reference/scipy_fit/data")
        .join(file);
    let table = read_table(&path).expect("committed data set");
    let col = table
        .columns
        .iter()
        .find(|c| c.name == name)
        .expect("column");
    col.cells
        .iter()
        .map(|v| match v {
            Value::Quantity(q, _) => q.si,
            _ => f64::NAN,
        })
        .collect()
}

fn gab(p: &[f64], aw: f64) -> f64 {
    let ka = p[2] * aw;
    p[0] * p[1] * ka / ((1.0 - ka) * (1.0 - ka + p[1] * ka))
}

fn page(p: &[f64], t: f64) -> f64 {
    (-p[0] * t.powf(p[1])).exp()
}

/// Page model in `ln t`, with its derivatives: `d/dk = -t^n MR`, `d/dn = -k t^n ln t MR`.
fn page_with_gradient(p: &[f64], ln_t: f64, gradient: &mut [f64]) -> f64 {
    let tn = (p[1] * ln_t).exp();
    let mr = (-p[0] * tn).exp();
    gradient[0] = -tn * mr;
    gradient[1] = -p[0] * tn * ln_t * mr;
    mr
}

/// One benchmark case: its name and a closure doing one fit, returning the
/// parameters and, where known, the evaluations used.
type Case = (&'static str, Box<dyn Fn() -> (Vec<f64>, Option<usize>)>);

fn outcome(fit: FitResult) -> (Vec<f64>, Option<usize>) {
    (fit.params, Some(fit.evaluations))
}

/// The benchmark cases.
fn cases() -> Vec<Case> {
    let (aw, x, t) = (
        column("starch_powder_25C.csv", "aw"),
        column("starch_powder_25C.csv", "X"),
        column("starch_powder_25C.csv", "T"),
    );
    let minutes: Vec<f64> = column("page_run_300.csv", "t")
        .iter()
        .map(|s| s / 60.0)
        .collect();
    let ln_minutes: Vec<f64> = minutes.iter().map(|t| t.ln()).collect();
    let seconds = column("page_run_300.csv", "t");
    let mr = column("page_run_300.csv", "MR");
    let (aw2, x2, mr2, mr3, mr4) = (aw.clone(), x.clone(), mr.clone(), mr.clone(), mr.clone());
    vec![
        (
            "gab_15",
            Box::new(move || {
                least_squares(
                    &gab,
                    black_box(&aw),
                    black_box(&x),
                    &[0.07, 10.0, 0.85],
                    &unbounded(3),
                )
                .map(outcome)
                .expect("GAB fit")
            }),
        ),
        (
            "gab_15_with_starts",
            Box::new(move || {
                fit_isotherm(IsothermKind::Gab, black_box(&aw2), &t, black_box(&x2), None)
                    .map(|f| outcome(f.result))
                    .expect("GAB fit")
            }),
        ),
        (
            "page_300",
            Box::new(move || {
                least_squares(
                    &page,
                    black_box(&minutes),
                    black_box(&mr2),
                    &[0.01, 1.0],
                    &unbounded(2),
                )
                .map(outcome)
                .expect("Page fit")
            }),
        ),
        (
            "page_300_gradient",
            Box::new(move || {
                least_squares_with_gradient(
                    &page_with_gradient,
                    black_box(&ln_minutes),
                    black_box(&mr3),
                    &[0.01, 1.0],
                    &unbounded(2),
                )
                .map(outcome)
                .expect("Page fit")
            }),
        ),
        (
            "page_300_thin_layer",
            Box::new(move || {
                let fit = fit_thin_layer(
                    ThinLayerModel::Page,
                    black_box(&seconds),
                    black_box(&mr4),
                    60.0,
                )
                .expect("Page fit");
                (fit.params, None)
            }),
        ),
    ]
}

/// Process CPU time in seconds (CLOCK_PROCESS_CPUTIME_ID).
fn cpu_seconds() -> f64 {
    let mut ts = libc::timespec {
        tv_sec: 0,
        tv_nsec: 0,
    };
    // SAFETY: clock_gettime writes one timespec into the valid pointer we pass.
    unsafe { libc::clock_gettime(libc::CLOCK_PROCESS_CPUTIME_ID, &mut ts) };
    ts.tv_sec as f64 + ts.tv_nsec as f64 * 1e-9
}

/// CPU time per fit: repeat for about one CPU second, best of three rounds.
fn cpu_timing() {
    let only = std::env::var("FIT_CASE").ok();
    for (name, fit) in cases() {
        if only.as_deref().is_some_and(|o| o != name) {
            continue;
        }
        let (params, evaluations) = fit();
        let once = {
            let t0 = cpu_seconds();
            black_box(fit());
            (cpu_seconds() - t0).max(1e-7)
        };
        let fixed = std::env::var("FIT_REPS").ok().and_then(|r| r.parse().ok());
        let reps = fixed.unwrap_or(((0.3 / once) as usize).max(10));
        let best = (0..if fixed.is_some() { 1 } else { 3 })
            .map(|_| {
                let t0 = cpu_seconds();
                for _ in 0..reps {
                    black_box(fit());
                }
                (cpu_seconds() - t0) / reps as f64
            })
            .fold(f64::INFINITY, f64::min);
        println!("PARAMS {name} {params:?}");
        if let Some(evaluations) = evaluations {
            println!("EVALUATIONS {name} {evaluations}");
        }
        println!("CPU {name} {best:e}");
    }
}

fn main() {
    if std::env::var_os("FIT_CPU_TIMING").is_some() {
        cpu_timing();
        return;
    }
    let mut c = Criterion::default().configure_from_args();
    for (name, fit) in cases() {
        c.bench_function(name, |b| b.iter(&fit));
    }
    c.final_summary();
}
