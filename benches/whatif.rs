//! Speed of what-if studies (criterion, or one timed run with `--oneshot`).
//!
//! The worksheet is a small tray dryer: an air state from dry-bulb and
//! relative humidity (shown whole with its wet-bulb, enthalpy, density...;
//! in a study's points only its engine state is built, as the transfer
//! built-ins it goes to read nothing else), the parallel-
//! flow film coefficient, the wet-surface balance (Chilton-Colburn, solved for
//! the surface temperature) giving the constant drying rate, and the duration
//! of the constant-rate period.
//!
//! - `sweep_100k`: a 400 x 250 sweep over air temperature and humidity
//!   (100,000 points), all threads; with `--oneshot` also on one thread.
//! - `monte_carlo_10k`: 10,000 Monte Carlo samples of the same sheet.
//!
//! On a shared machine wall time depends on the CPU share; `--oneshot` also
//! prints the process CPU time of each study (from /proc/self/stat), which
//! does not.
//!
//! Run: `cargo bench --bench whatif` (criterion) or
//! `cargo bench --bench whatif -- --oneshot` (one timed run of each, printed
//! as `key=value` lines; used by benches/whatif_compare.py).
//! `-- --single-pass sweep|sheet` runs the sweep once on one thread, or only
//! its worksheet, for instruction counts with `valgrind --tool=callgrind`:
//! per point = (sweep - sheet) / 100,000.

use std::hint::black_box;
use std::time::{Duration, Instant};

use criterion::Criterion;
use siccant::session::Session;

/// The tray-dryer worksheet, shared with benches/whatif_compare.py.
pub const TRAY: &str = "
input T_air = 70 degC
input rh_air = 4 %
hot = air(T: T_air, rh: rh_air)
h = h_tray_parallel(air: hot, velocity: 3 m/s)
surface = wet_surface(hot, h: h)
t_constant = constant_rate_time(load: 20 kg/m^2, X1: 1.6 db, X2: 0.5 db, Rc: surface.Rc)
";

/// Full humid-air states one point of the sheet builds: the worksheet's
/// `air(T, rh)` engine state (an `AirState`: humidity ratio and saturation
/// pressure solved from T and rh; in a study's points its record fields are
/// not built, as nothing reads them) and, per film-temperature pass of the
/// wet-surface solve, one complete `AirState` from (T, w, p) with its
/// transport properties (`engine::transport::state_and_transport`: the same
/// state, fields, checks and errors as `AirState::from_w`, sharing one ln T
/// with the transport properties).
/// Counted with `valgrind --tool=callgrind` on a 2,500-point sweep of this
/// sheet on one thread (`steps(40.2 degC, 120 degC, 0.8 K)` x
/// `steps(1 %, 25.9 %, 1 %)`): 4,916 film passes (calls of
/// `state_and_transport`, 4,916 of `analogy::colburn_factor` too; callgrind
/// `--toggle-collect='*whatif::model::Model::eval'`, then
/// `callgrind_annotate --inclusive=yes`) in 2,501 evaluations (the
/// sheet's own value before the sweep is the extra one), 1.9656 a point,
/// rounded down. Most points take two passes, a few settle in one.
pub const FULL_STATES_PER_POINT: f64 = 1.0 + 1.96;

/// Not counted as states: the evaluations of saturated air at trial surface
/// temperatures (humidity ratio, latent heat and their slopes) inside the
/// surface-temperature solve, 7,417 in the same 2,501 evaluations (most of
/// them now interpolated in the solve's table of the saturated side, which
/// is filled from exact evaluations; 296,618 in the 100,001 evaluations of
/// the 100,000-point sweep).
pub const SATURATED_SURFACE_EVALUATIONS_PER_POINT: f64 = 2.97;

/// 400 air temperatures x 250 humidities = 100,000 points.
pub const SWEEP: &str =
    "s = sweep([t_constant], T_air: steps(40.2 degC, 120 degC, 0.2 K), rh_air: steps(1 %, 25.9 %, 0.1 %))";

/// 10,000 samples.
pub const MONTE_CARLO: &str =
    "u = uncertainty([t_constant], T_air: normal(70 degC, 3 K), rh_air: uniform(2 %, 8 %), samples: 10000, seed: 1)";

fn study(extra: &str) -> Duration {
    let mut session = Session::new();
    let text = format!("{TRAY}\n{extra}\n");
    let start = Instant::now();
    let out = session.eval(&text);
    let elapsed = start.elapsed();
    if let Err(d) = &out {
        panic!("benchmark worksheet failed: {d:?}");
    }
    black_box(out.ok());
    elapsed
}

fn points_of(extra: &str, field: &str) -> usize {
    let mut session = Session::new();
    let _ = session.eval(&format!("{TRAY}\n{extra}\n"));
    let name = if field == "points" { "s" } else { "u" };
    match session.value(name) {
        Some(siccant::value::Value::Record(r)) => match r.get(field) {
            Some(siccant::value::Value::Quantity(q, _)) => q.si as usize,
            _ => 0,
        },
        _ => 0,
    }
}

/// CPU time of this process (all threads) in seconds, from /proc/self/stat
/// (Linux; clock ticks of 1/100 s). `None` elsewhere.
fn cpu_seconds() -> Option<f64> {
    let stat = std::fs::read_to_string("/proc/self/stat").ok()?;
    let rest = stat.rsplit_once(')')?.1;
    let fields: Vec<&str> = rest.split_whitespace().collect();
    let utime: f64 = fields.get(11)?.parse().ok()?;
    let stime: f64 = fields.get(12)?.parse().ok()?;
    Some((utime + stime) / 100.0)
}

/// Wall time and CPU time of `f`.
fn timed(f: impl FnOnce() -> Duration) -> (Duration, f64) {
    let before = cpu_seconds().unwrap_or(0.0);
    let wall = f();
    let cpu = cpu_seconds().map_or(wall.as_secs_f64(), |after| after - before);
    (wall, cpu)
}

fn on_threads(threads: usize, extra: &str) -> Duration {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .expect("thread pool");
    pool.install(|| study(extra))
}

/// One timed run of each study, printed as `key=value` lines.
fn oneshot() {
    let threads = rayon::current_num_threads();
    let points = points_of(SWEEP, "points");
    let samples = points_of(MONTE_CARLO, "samples");
    let base = study("");
    let (all, all_cpu) = timed(|| study(SWEEP));
    let (one, one_cpu) = timed(|| on_threads(1, SWEEP));
    let (mc, mc_cpu) = timed(|| study(MONTE_CARLO));
    println!("threads={threads}");
    println!("base_seconds={:.6}", base.as_secs_f64());
    println!("sweep_points={points}");
    println!("sweep_seconds_all_threads={:.4}", all.as_secs_f64());
    println!("sweep_cpu_seconds_all_threads={all_cpu:.2}");
    println!("sweep_seconds_one_thread={:.4}", one.as_secs_f64());
    println!("sweep_cpu_seconds_one_thread={one_cpu:.2}");
    println!("monte_carlo_samples={samples}");
    println!("monte_carlo_seconds={:.4}", mc.as_secs_f64());
    println!("monte_carlo_cpu_seconds={mc_cpu:.2}");
    println!("full_states_per_point={FULL_STATES_PER_POINT:.2}");
    println!(
        "saturated_surface_evaluations_per_point={SATURATED_SURFACE_EVALUATIONS_PER_POINT:.2}"
    );
}

fn criterion_benches() {
    let mut c = Criterion::default()
        .sample_size(10)
        .measurement_time(Duration::from_secs(20))
        .configure_from_args();
    c.bench_function("sweep_100k", |b| b.iter(|| study(SWEEP)));
    c.bench_function("monte_carlo_10k", |b| b.iter(|| study(MONTE_CARLO)));
    c.final_summary();
}

/// One pass of the sweep ([`TRAY`] with [`SWEEP`], on one thread) or of
/// the worksheet alone, for instruction counts.
fn single_pass(what: &str) {
    match what {
        "sweep" => {
            black_box(on_threads(1, SWEEP));
        }
        "sheet" => {
            black_box(on_threads(1, ""));
        }
        other => panic!("--single-pass takes sweep or sheet, not {other}"),
    }
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    if args.iter().any(|a| a == "--oneshot") {
        oneshot();
    } else if let Some(i) = args.iter().position(|a| a == "--single-pass") {
        single_pass(args.get(i + 1).map_or("sweep", String::as_str));
    } else {
        criterion_benches();
    }
}
