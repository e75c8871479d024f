//! Speed of the humid-air engine (criterion, or CPU-timed runs with `--oneshot`).
//!
//! - `wet_bulb_100k`: thermodynamic wet-bulb of 100,000 states through the
//!   library API (`AirState::wet_bulb`), 0-200 degC at 101.325 kPa (target: under
//!   300 ns per state; CoolProp's HAPropsSI from Python takes hundreds of us).
//! - `air_state_100k`: building the 100,000 states from (T, rh) or (T, w).
//! - `air_builtin_10k`: the `air(T:, rh: | w:)` built-in through the registry
//!   (argument binding, kind checks, the full record with dew point and
//!   wet-bulb), 10,000 calls: the per-state cost a worksheet sweep will pay.
//! - `--oneshot` only: [`SWEEP_SHEET`], a worksheet `sweep` over 100,000 air
//!   states (400 dry-bulbs x 250 humidity ratios, the wet-bulb reported),
//!   through the whole language (target: under 1 us per state).
//!
//! The state set is the same one `benches/air_compare.py` gives CoolProp and
//! psychrolib. Run: `cargo bench --bench air` (criterion, wall time), or
//! `cargo bench --bench air -- --oneshot`, which prints `key=value` lines of
//! CPU time per state (best of a few rounds; on a shared machine CPU time,
//! unlike wall time, does not count the time other processes hold the core),
//! or the comparison with `python3 benches/air_compare.py`.
//! `-- --single-pass build|wet_bulb|builtin|sweep|sheet` runs one pass of one workload,
//! for instruction counts with `valgrind --tool=callgrind`.

use criterion::Criterion;
use std::hint::black_box;
use std::time::Instant;

use siccant::diag::Span;
use siccant::engine::air::AirState;
use siccant::library::{find, Arg, Args};
use siccant::session::Session;
use siccant::units::{Dim, Kind, Quantity};
use siccant::value::Value;
use uom::si::f64::{Pressure, ThermodynamicTemperature};
use uom::si::pressure::pascal;
use uom::si::thermodynamic_temperature::degree_celsius;

/// Number of states per iteration.
pub const STATES: usize = 100_000;

/// The i-th benchmark state: T = 0..200 degC; rh 5..95 % up to 90 degC, else
/// w = 0.002..0.202 kg/kg. Mirrored in benches/air_compare.py.
pub fn state_inputs(i: usize) -> (f64, Option<f64>, Option<f64>) {
    let a = ((i * 7919) % 10007) as f64 / 10007.0;
    let b = ((i * 104_729) % 10009) as f64 / 10009.0;
    let t_c = 200.0 * a;
    if t_c <= 90.0 {
        (t_c, Some(0.05 + 0.9 * b), None)
    } else {
        (t_c, None, Some(0.002 + 0.2 * b))
    }
}

fn build(i: usize) -> AirState {
    let p = Pressure::new::<pascal>(101_325.0);
    let (t_c, rh, w) = state_inputs(i);
    let t = ThermodynamicTemperature::new::<degree_celsius>(t_c);
    let s = match (rh, w) {
        (Some(rh), _) => AirState::from_rh(t, rh, p),
        (_, Some(w)) => AirState::from_w(t, w, p),
        _ => unreachable!("every input has rh or w"),
    };
    s.expect("benchmark states are valid")
}

/// Call the `air` built-in for the i-th state, as the evaluator would.
fn call_air(i: usize) -> Value {
    let builtin = find("air").expect("air is registered");
    let (t_c, rh, w) = state_inputs(i);
    let arg = |name: &str, q: Quantity| Arg {
        name: Some(name.to_string()),
        value: Value::Quantity(q, None),
        span: Span::default(),
    };
    let t = arg(
        "T",
        Quantity::new(t_c + 273.15, Dim::TEMPERATURE, Kind::AbsoluteTemperature),
    );
    let second = match (rh, w) {
        (Some(rh), _) => arg("rh", Quantity::new(rh, Dim::NONE, Kind::Activity)),
        (_, Some(w)) => arg("w", Quantity::new(w, Dim::NONE, Kind::HumidityRatio)),
        _ => unreachable!("every input has rh or w"),
    };
    let mut args = Args::bind(builtin, Span::default(), vec![t, second]).expect("arguments bind");
    (builtin.func)(&mut args).expect("air state")
}

/// The worksheet of the sweep benchmark: one air state and its wet-bulb.
pub const SWEEP_SHEET: &str = "
input T = 60 degC
input w = 0.02 kg/kg_da
a = air(T: T, w: w)
twb = a.wetbulb
";

/// 400 dry-bulbs (50.25..150 degC) x 250 humidity ratios (0.0003..0.075 kg/kg,
/// all below saturation at 50 degC) = 100,000 states.
pub const SWEEP: &str = "s = sweep([twb], T: steps(50.25 degC, 150 degC, 0.25 K), w: steps(0.0003 kg/kg_da, 0.075 kg/kg_da, 0.0003 kg/kg_da))";

fn benches(c: &mut Criterion) {
    let states: Vec<AirState> = (0..STATES).map(build).collect();
    let mut group = c.benchmark_group("air");
    group.sample_size(10);
    group.bench_function("wet_bulb_100k", |b| b.iter(|| wet_bulb_sum(&states)));
    group.bench_function("air_state_100k", |b| b.iter(build_all));
    group.bench_function("air_builtin_10k", |b| b.iter(|| builtin_calls(10_000)));
    group.finish();
}

fn wet_bulb_sum(states: &[AirState]) -> f64 {
    let mut sum = 0.0;
    for s in states {
        sum += s.wet_bulb().expect("wet-bulb solves").value;
    }
    black_box(sum)
}

fn build_all() -> f64 {
    (0..STATES)
        .map(|i| build(black_box(i)).humidity_ratio())
        .sum::<f64>()
}

fn builtin_calls(n: usize) {
    for i in 0..n {
        black_box(call_air(i));
    }
}

/// CPU time of `clock` (CLOCK_THREAD_CPUTIME_ID or CLOCK_PROCESS_CPUTIME_ID), s.
fn cpu_seconds(clock: libc::clockid_t) -> f64 {
    let mut ts = libc::timespec {
        tv_sec: 0,
        tv_nsec: 0,
    };
    // SAFETY: clock_gettime writes one timespec into the valid pointer we pass.
    unsafe { libc::clock_gettime(clock, &mut ts) };
    ts.tv_sec as f64 + ts.tv_nsec as f64 * 1e-9
}

/// Best of `rounds` runs of `f`: this thread's CPU time per item, ns.
fn thread_cpu_ns(rounds: usize, items: usize, mut f: impl FnMut()) -> f64 {
    (0..rounds)
        .map(|_| {
            let start = cpu_seconds(libc::CLOCK_THREAD_CPUTIME_ID);
            f();
            (cpu_seconds(libc::CLOCK_THREAD_CPUTIME_ID) - start) * 1e9 / items as f64
        })
        .fold(f64::INFINITY, f64::min)
}

/// The worksheet sweep on `threads` threads: (wall s, process CPU s, points).
fn sweep_run(threads: usize) -> (f64, f64, usize) {
    let pool = rayon::ThreadPoolBuilder::new()
        .num_threads(threads)
        .build()
        .expect("thread pool");
    pool.install(|| {
        let mut session = Session::new();
        let text = format!("{SWEEP_SHEET}\n{SWEEP}\n");
        let cpu = cpu_seconds(libc::CLOCK_PROCESS_CPUTIME_ID);
        let wall = Instant::now();
        let out = session.eval(&text);
        let wall = wall.elapsed().as_secs_f64();
        let cpu = cpu_seconds(libc::CLOCK_PROCESS_CPUTIME_ID) - cpu;
        if let Err(d) = &out {
            panic!("sweep worksheet failed: {d:?}");
        }
        let points = match session.value("s") {
            Some(Value::Record(r)) => match r.get("points") {
                Some(Value::Quantity(q, _)) => q.si as usize,
                _ => 0,
            },
            _ => 0,
        };
        (wall, cpu, points)
    })
}

/// CPU time per state of each benchmark, printed as `key=value` lines.
fn oneshot() {
    let states: Vec<AirState> = (0..STATES).map(build).collect();
    let wet_bulb = thread_cpu_ns(5, STATES, || {
        wet_bulb_sum(&states);
    });
    let build_ns = thread_cpu_ns(3, STATES, || {
        black_box(build_all());
    });
    let builtin = thread_cpu_ns(3, 10_000, || builtin_calls(10_000));
    let (_, one_cpu, points) = (0..2)
        .map(|_| sweep_run(1))
        .min_by(|a, b| a.1.total_cmp(&b.1))
        .expect("two runs");
    let (all_wall, all_cpu, _) = sweep_run(rayon::current_num_threads());
    println!("wet_bulb_cpu_ns_per_state={wet_bulb:.1}");
    println!("air_state_cpu_ns_per_state={build_ns:.1}");
    println!("air_builtin_cpu_ns_per_call={builtin:.1}");
    println!("sweep_points={points}");
    println!(
        "sweep_cpu_ns_per_state_one_thread={:.1}",
        one_cpu * 1e9 / points as f64
    );
    println!("sweep_threads={}", rayon::current_num_threads());
    println!(
        "sweep_cpu_ns_per_state_all_threads={:.1}",
        all_cpu * 1e9 / points as f64
    );
    println!(
        "sweep_wall_ns_per_state_all_threads={:.1}",
        all_wall * 1e9 / points as f64
    );
}

/// One pass of one workload, for instruction counts under
/// `valgrind --tool=callgrind` (repeatable on a shared machine): `build` makes
/// the 100,000 states, `wet_bulb` makes them and solves each wet-bulb once,
/// `builtin` makes 10,000 `air()` records, `sweep` runs the worksheet sweep
/// ([`SWEEP_SHEET`], 100,000 states) on one thread and `sheet` only its
/// worksheet, without the sweep. Per-state figures: (wet_bulb - build) /
/// 100,000, and (sweep - sheet) / 100,000.
fn single_pass(what: &str) {
    match what {
        "build" => {
            black_box(build_all());
        }
        "wet_bulb" => {
            let states: Vec<AirState> = (0..STATES).map(build).collect();
            wet_bulb_sum(&states);
        }
        "builtin" => builtin_calls(10_000),
        "sweep" => {
            black_box(sweep_run(1));
        }
        "sheet" => {
            let mut session = Session::new();
            black_box(session.eval(SWEEP_SHEET).is_ok());
        }
        other => {
            panic!("--single-pass takes build, wet_bulb, builtin, sweep or sheet, not {other}")
        }
    }
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    if args.iter().any(|a| a == "--oneshot") {
        oneshot();
        return;
    }
    if let Some(i) = args.iter().position(|a| a == "--single-pass") {
        single_pass(args.get(i + 1).map_or("wet_bulb", String::as_str));
        return;
    }
    let mut c = Criterion::default().configure_from_args();
    benches(&mut c);
    c.final_summary();
}
