//! Speed of the language core (criterion).
//!
//! - `worksheet_2000_lines`: parse + dimension check + evaluate a generated
//!   2,000-line worksheet in a fresh session (target: under 50 ms).
//! - `multiply_and_convert`: one unit-checked `q * t as kWh` through the
//!   evaluator, names already computed (target: under 100 ns; pint takes tens
//!   of microseconds, see benches/pint_anchor.py).
//!
//! Run: `cargo bench --bench core_eval`

use criterion::{criterion_group, criterion_main, Criterion};
use std::hint::black_box;

use siccant::eval::{Ctx, Limits, Mode, Sheet, Sources};
use siccant::session::Session;
use siccant::syntax::{self, StmtKind};

/// A 2,000-line worksheet mixing inputs, unit arithmetic, functions,
/// conversions and checks; every value depends on earlier ones.
pub fn generated_worksheet(lines: usize) -> String {
    let mut s = String::from("input T_in = 80 degC\ninput L = 12 mm\nflux(h, dT) = h * dT\n");
    let mut i = 0;
    while s.lines().count() < lines {
        let line = match i % 8 {
            0 => format!("a{i} = 2.4 m * 1.8 m + {} m^2", i % 7),
            1 => format!("m{i} = 14 kg/m^2 * a{}", i - 1),
            2 => format!("d{i} = T_in - {} degC", 20 + i % 30),
            3 => format!("q{i} = flux(5 BTU/(h*ft^2*degF), d{})", i - 1),
            4 => format!("w{i} = m{} * (1.4 db - 0.{} db)", i - 3, 1 + i % 8),
            5 => format!("t{i} = w{} / (2.5 kg/h) as min", i - 1),
            6 => format!("check q{} > 1 W/m^2", i - 3),
            _ => format!("e{i} = q{} * a{} * t{} as kWh", i - 4, i - 7, i - 2),
        };
        s.push_str(&line);
        s.push('\n');
        i += 1;
    }
    s
}

fn worksheet(c: &mut Criterion) {
    let text = generated_worksheet(2000);
    assert!(
        Session::with_file("bench.sicc").eval(&text).is_ok(),
        "generated worksheet evaluates"
    );
    c.bench_function("worksheet_2000_lines", |b| {
        b.iter(|| {
            let mut session = Session::with_file("bench.sicc");
            black_box(
                session
                    .eval(black_box(&text))
                    .map(|o| o.items.len())
                    .unwrap_or(0),
            )
        })
    });
}

fn multiply_and_convert(c: &mut Criterion) {
    let (defs, _) = syntax::parse("q = 3 kW\nt = 2 h\n", 0);
    let (shown, _) = syntax::parse("q * t as kWh", 1);
    let Some(StmtKind::Show(expr)) = shown.into_iter().next().map(|s| s.kind) else {
        panic!("bench expression parses")
    };
    let mut sheet = Sheet::default();
    assert!(sheet.define(&defs, true).is_ok());
    let mut sources = Sources::default();
    let limits = Limits::default();
    let mut ctx = Ctx::new(&mut sheet, &mut sources, &limits, Mode::Run);
    assert!(ctx.force("q", defs[0].span).is_ok() && ctx.force("t", defs[1].span).is_ok());
    assert!(ctx.expr(&expr).is_ok());
    c.bench_function("multiply_and_convert", |b| {
        b.iter(|| {
            ctx.ops = 0;
            black_box(ctx.expr(black_box(&expr)).is_ok())
        })
    });
}

criterion_group!(benches, worksheet, multiply_and_convert);
criterion_main!(benches);
