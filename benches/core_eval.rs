//! Speed of the language core (criterion).
//!
//! - `worksheet_2000_lines`: parse + dimension check + evaluate a generated
//!   2,000-line worksheet in a fresh session (target: under 50 ms).
//! - `multiply_and_convert`: one unit-checked `q * t as kWh` through the
//!   evaluator, names already computed (target: under 100 ns; pint takes tens
//!   of microseconds, see benches/pint_anchor.py).
//!
//! Run: `cargo bench --bench core_eval` (criterion, wall time), or
//! `cargo bench --bench core_eval -- --cpu` (thread CPU time of both targets,
//! best of several runs, as `key=value` lines; on a shared machine this is the
//! figure to compare with the targets).
//! `cargo bench --bench core_eval -- --calls N` evaluates `q * t as kWh` N
//! times and nothing else, for instruction counts with
//! `valgrind --tool=callgrind` (two runs with different N give the count per
//! evaluation as the difference over the difference in N).

use criterion::Criterion;
use std::hint::black_box;

use siccant::eval::{Ctx, Limits, Mode, Sheet, Sources};
use siccant::session::Session;
use siccant::syntax::{self, StmtKind};

/// A 2,000-line worksheet mixing inputs, unit arithmetic, functions,
/// conversions and checks; every value depends on earlier ones.
pub fn generated_worksheet(lines: usize) -> String {
    let mut s = String::from("input T_in = 80 degC\ninput L = 12 mm\nflux(h, dT) = h * dT\n");
    let mut i = 0;
    // Three header lines, then one line per step.
    while 3 + i < lines {
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

/// The parsed `q * t as kWh` with `q` and `t` defined in `sheet`.
fn multiply_setup(sheet: &mut Sheet) -> siccant::syntax::Expr {
    let (defs, _) = syntax::parse("q = 3 kW\nt = 2 h\n", 0);
    let (shown, _) = syntax::parse("q * t as kWh", 1);
    let Some(StmtKind::Show(expr)) = shown.into_iter().next().map(|s| s.kind) else {
        panic!("bench expression parses")
    };
    assert!(sheet.define(&defs, true).is_ok());
    siccant::syntax::Expr::clone(&expr)
}

/// A context over `sheet` with `q` and `t` computed.
fn multiply_ctx<'a>(sheet: &'a mut Sheet, sources: &'a mut Sources, limits: &'a Limits) -> Ctx<'a> {
    let mut ctx = Ctx::new(sheet, sources, limits, Mode::Run);
    let span = siccant::diag::Span::default();
    assert!(ctx.force("q", span).is_ok() && ctx.force("t", span).is_ok());
    ctx
}

fn multiply_and_convert(c: &mut Criterion) {
    let mut sheet = Sheet::default();
    let expr = multiply_setup(&mut sheet);
    let (mut sources, limits) = (Sources::default(), Limits::default());
    let mut ctx = multiply_ctx(&mut sheet, &mut sources, &limits);
    assert!(ctx.expr(&expr).is_ok());
    c.bench_function("multiply_and_convert", |b| {
        b.iter(|| {
            ctx.ops = 0;
            black_box(ctx.expr(black_box(&expr)).is_ok())
        })
    });
}

/// CPU time of this thread in seconds (`CLOCK_THREAD_CPUTIME_ID`): on a
/// shared machine it does not count the time other processes hold the core.
fn thread_cpu_seconds() -> f64 {
    let mut ts = libc::timespec {
        tv_sec: 0,
        tv_nsec: 0,
    };
    // SAFETY: clock_gettime writes into the timespec we own.
    let rc = unsafe { libc::clock_gettime(libc::CLOCK_THREAD_CPUTIME_ID, &mut ts) };
    assert_eq!(rc, 0, "thread CPU clock");
    ts.tv_sec as f64 + ts.tv_nsec as f64 * 1e-9
}

/// Best CPU time of `f` over `repeat` runs.
fn best_cpu(repeat: usize, mut f: impl FnMut()) -> f64 {
    (0..repeat)
        .map(|_| {
            let start = thread_cpu_seconds();
            f();
            thread_cpu_seconds() - start
        })
        .fold(f64::INFINITY, f64::min)
}

/// `--cpu`: both targets timed in thread CPU time (best of several runs),
/// printed as `key=value` lines (used by benches/pint_anchor.py).
fn cpu_report() {
    let mut sheet = Sheet::default();
    let expr = multiply_setup(&mut sheet);
    let (mut sources, limits) = (Sources::default(), Limits::default());
    let mut ctx = multiply_ctx(&mut sheet, &mut sources, &limits);
    let n = 2_000_000;
    let per_op = best_cpu(5, || {
        for _ in 0..n {
            ctx.ops = 0;
            black_box(ctx.expr(black_box(&expr)).is_ok());
        }
    }) / n as f64;
    println!("multiply_and_convert_cpu_ns={:.1}", per_op * 1e9);
    let text = generated_worksheet(2000);
    let sheet_cpu = best_cpu(15, || {
        let mut session = Session::with_file("bench.sicc");
        black_box(session.eval(black_box(&text)).is_ok());
    });
    println!("worksheet_2000_lines_cpu_ms={:.2}", sheet_cpu * 1e3);
}

/// `--calls N`: only N evaluations of `q * t as kWh` (for callgrind).
fn calls_only(n: usize) {
    let mut sheet = Sheet::default();
    let expr = multiply_setup(&mut sheet);
    let (mut sources, limits) = (Sources::default(), Limits::default());
    let mut ctx = multiply_ctx(&mut sheet, &mut sources, &limits);
    let mut ok = 0usize;
    for _ in 0..n {
        ctx.ops = 0;
        ok += usize::from(black_box(ctx.expr(black_box(&expr)).is_ok()));
    }
    println!("multiply_and_convert_calls={ok}");
}

fn main() {
    let args: Vec<String> = std::env::args().collect();
    if let Some(i) = args.iter().position(|a| a == "--calls") {
        let n = args.get(i + 1).and_then(|n| n.parse().ok()).unwrap_or(1);
        calls_only(n);
        return;
    }
    if std::env::args().any(|a| a == "--cpu") {
        cpu_report();
        return;
    }
    let mut c = Criterion::default().configure_from_args();
    worksheet(&mut c);
    multiply_and_convert(&mut c);
    c.final_summary();
}
