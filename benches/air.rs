//! Speed of the humid-air engine (criterion).
//!
//! - `wet_bulb_100k`: thermodynamic wet-bulb of 100,000 states through the
//!   library API (`AirState::wet_bulb`), 0-200 degC at 101.325 kPa (target: under
//!   300 ns per state; CoolProp's HAPropsSI from Python takes hundreds of us).
//! - `air_state_100k`: building the 100,000 states from (T, rh) or (T, w).
//! - `air_builtin_10k`: the `air(T:, rh: | w:)` built-in through the registry
//!   (argument binding, kind checks, the full record with dew point and
//!   wet-bulb), 10,000 calls: the per-state cost a worksheet sweep will pay.
//!
//! The state set is the same one `benches/air_compare.py` gives CoolProp and
//! psychrolib. Run: `cargo bench --bench air`, or the comparison with
//! `python3 benches/air_compare.py`.

use criterion::{criterion_group, criterion_main, Criterion};
use std::hint::black_box;

use siccant::diag::Span;
use siccant::engine::air::AirState;
use siccant::library::{find, Arg, Args};
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

fn benches(c: &mut Criterion) {
    let states: Vec<AirState> = (0..STATES).map(build).collect();
    let mut group = c.benchmark_group("air");
    group.sample_size(10);
    group.bench_function("wet_bulb_100k", |b| {
        b.iter(|| {
            let mut sum = 0.0;
            for s in &states {
                sum += s.wet_bulb().expect("wet-bulb solves").value;
            }
            black_box(sum)
        })
    });
    group.bench_function("air_state_100k", |b| {
        b.iter(|| {
            (0..STATES)
                .map(|i| build(black_box(i)).humidity_ratio())
                .sum::<f64>()
        })
    });
    group.bench_function("air_builtin_10k", |b| {
        b.iter(|| {
            for i in 0..10_000 {
                black_box(call_air(i));
            }
        })
    });
    group.finish();
}

criterion_group!(air, benches);
criterion_main!(air);
