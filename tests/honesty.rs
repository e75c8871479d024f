//! Numerical honesty of the shared solvers: without convergence they return
//! an error, never a number. (Out-of-range warnings of the correlations are
//! tested in the language suite, tests/suite/harden/validity.sicc.)

use siccant::engine::integrate::gauss_kronrod;
use siccant::engine::solve::{brent, expand_bracket, newton_bracketed, SolveError, Tolerance};

fn tight(max_iterations: u32) -> Tolerance {
    Tolerance {
        max_iterations,
        ..Tolerance::new(1e-15, 0.0)
    }
}

#[test]
fn brent_refuses_an_interval_without_a_sign_change() {
    let e = brent(|x| x * x + 1.0, -1.0, 1.0, Tolerance::default());
    assert!(matches!(e, Err(SolveError::NotBracketed { .. })), "{e:?}");
    let e = brent(|_| f64::NAN, -1.0, 1.0, Tolerance::default());
    assert!(matches!(e, Err(SolveError::NotBracketed { .. })), "{e:?}");
}

#[test]
fn brent_reports_a_residual_that_is_not_finite_inside_the_bracket() {
    // finite at the ends, NaN everywhere inside
    let f = |x: f64| if x == -1.0 || x == 1.0 { x } else { f64::NAN };
    let e = brent(f, -1.0, 1.0, Tolerance::default());
    assert!(matches!(e, Err(SolveError::NotFinite { .. })), "{e:?}");
}

#[test]
fn brent_out_of_iterations_is_an_error_not_the_last_iterate() {
    // a root of cos(x) - x at about 0.739; two iterations cannot reach 1e-15
    let e = brent(|x| x.cos() - x, 0.0, 1.0, tight(2));
    assert!(matches!(e, Err(SolveError::NotConverged { .. })), "{e:?}");
    let ok = brent(|x| x.cos() - x, 0.0, 1.0, tight(200)).expect("converges");
    assert!((ok.cos() - ok).abs() < 1e-12);
}

#[test]
fn newton_out_of_iterations_is_an_error() {
    let f = |x: f64| (x.powi(3) - 2.0, 3.0 * x * x);
    let e = newton_bracketed(f, 0.0, 2.0, 0.1, tight(1));
    assert!(matches!(e, Err(SolveError::NotConverged { .. })), "{e:?}");
    let e = newton_bracketed(|_| (f64::NAN, 1.0), 0.0, 2.0, 1.0, tight(50));
    assert!(matches!(e, Err(SolveError::NotFinite { .. })), "{e:?}");
}

#[test]
fn a_bracket_that_never_changes_sign_is_an_error() {
    let e = expand_bracket(|x| x.exp(), 0.0, 1.0, 1e6);
    assert!(e.is_err(), "{e:?}");
}

#[test]
fn the_quadrature_refuses_too() {
    // an integrand with a non-integrable singularity: the budget runs out or
    // a non-finite value is met; either way an error
    let e = gauss_kronrod(|x| 1.0 / (x - 0.3).abs(), 0.0, 1.0, 1e-12, 0.0);
    assert!(e.is_err(), "{e:?}");
}
