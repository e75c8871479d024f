//! Speed of the finite-volume diffusion solver (criterion).
//!
//! `slab_100_cells_d_of_x`: a 10 mm slab drying from both faces (half-thickness
//! 5 mm), 100 cells graded toward the surface, D(X) = 2e-10 m^2/s *
//! exp(0.6 (X - Xe)), X0 = 3.0 db, Xe = 0.1 db, surface at equilibrium, run to
//! MR = 0.01 with the default error control. The same method-of-lines problem
//! is solved by scipy's solve_ivp (BDF) in benches/diffusion_compare.py, which
//! runs this file with `DIFFUSION_COMPARE=1` to print our figures as JSON.
//!
//! Run: `cargo bench --bench diffusion` (criterion), or the side-by-side
//! comparison: `python benches/diffusion_compare.py`.

use criterion::{criterion_group, Criterion};
use std::hint::black_box;
use std::time::Instant;

use siccant::engine::diffusion::finite_volume::face_radii;
use siccant::engine::diffusion::{
    solve_drying, Body, DiffusionProblem, Diffusivity, ProductTemperature, Shape, SolverSettings,
    Surface,
};

/// The benchmark problem (shared with benches/diffusion_compare.py).
pub fn problem() -> DiffusionProblem {
    DiffusionProblem {
        body: Body {
            shape: Shape::Slab,
            length_m: 0.005,
        },
        x_initial: 3.0,
        x_equilibrium: 0.1,
        diffusivity: Diffusivity {
            reference_m2_per_s: 2e-10,
            activation_energy_j_per_mol: 0.0,
            reference_temperature_k: 333.15,
            moisture_coefficient: 0.6,
            reference_moisture: 0.1,
        },
        temperature: ProductTemperature::Constant(333.15),
        surface: Surface::Equilibrium,
        shrinkage: 0.0,
    }
}

fn bench(c: &mut Criterion) {
    let p = problem();
    let s = SolverSettings::default();
    c.bench_function("slab_100_cells_d_of_x", |b| {
        b.iter(|| solve_drying(black_box(&p), black_box(&s)).map(|r| r.time_to_target_s))
    });
}

/// Figures for the Python comparison: drying time, steps and best-of-N wall time.
fn compare() {
    let p = problem();
    let s = SolverSettings::default();
    let mut best = f64::INFINITY;
    let mut total = 0.0;
    let repeats = 200;
    let mut last = None;
    for _ in 0..repeats {
        let start = Instant::now();
        let run = solve_drying(&p, &s);
        let elapsed = start.elapsed().as_secs_f64();
        best = best.min(elapsed);
        total += elapsed;
        last = Some(run);
    }
    match last {
        Some(Ok(run)) => {
            let faces = face_radii(p.body.length_m, s.cells, s.grading);
            let faces: Vec<String> = faces.iter().map(|f| format!("{f:.17e}")).collect();
            println!(
                "{{\"time_to_target_s\": {:.10e}, \"steps\": {}, \"rejected\": {}, \"newton\": {}, \"best_s\": {:.6e}, \"mean_s\": {:.6e}, \"repeats\": {repeats}, \"rel_tol\": {:e}, \"faces\": [{}]}}",
                run.time_to_target_s,
                run.steps,
                run.rejected,
                run.newton_iterations,
                best,
                total / repeats as f64,
                s.rel_tol,
                faces.join(", ")
            );
        }
        Some(Err(e)) => eprintln!("solver failed: {e}"),
        None => {}
    }
}

criterion_group!(benches, bench);

fn main() {
    if std::env::var_os("DIFFUSION_COMPARE").is_some() {
        compare();
        return;
    }
    benches();
    Criterion::default().configure_from_args().final_summary();
}
