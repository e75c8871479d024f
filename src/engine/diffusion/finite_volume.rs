//! Finite-volume solver for moisture diffusion in a slab, cylinder or
//! sphere, implicit in time with error control.
//!
//! Method of lines: the body is cut into `N` cells of fixed dry-solid content
//! (a Lagrangian, solid-based mesh, so shrinkage moves the faces but never
//! moves solid between cells). Water balance of cell `i`:
//! `S_i dX_i/dt = F_{i-1/2} - F_{i+1/2}`, with face flux
//! `F = A(r) rho_ds D (X_i - X_{i+1}) / (c_{i+1} - c_i)`, `A(r) = r^s`,
//! face `D` and `rho_ds` the arithmetic means of the two cells.
//! Surface: at equilibrium (`X = Xe`, half-cell distance), or through a film
//! `alpha` (m/s) in series with the half cell: `F = A rho_ds (X_N - Xe) /
//! (d/D + 1/alpha)` (Crank's "surface evaporation" condition).
//! Shrinkage: specific volume per kg dry solid `v(X) = (1 + b X)/(1 + b X0)`,
//! relative to the start (b = 0: rigid body).
//!
//! Time stepping: variable-step BDF2 (first step backward Euler), Newton
//! iteration with a tridiagonal Jacobian (Thomas algorithm), local error
//! estimated by Milne's device from a quadratic predictor, step size from
//! the error (E. Hairer, G. Wanner, *Solving Ordinary Differential Equations
//! II*, 2nd ed., Springer 1996, sections III.5 and IV.8).

use super::super::kinetics::{non_negative, positive, KineticsError};
use super::{Body, Diffusivity, ProductTemperature};

/// The surface boundary condition.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Surface {
    /// Surface moisture equal to the equilibrium moisture (infinite Biot number).
    Equilibrium,
    /// A surface mass-transfer coefficient `alpha` in m/s on the solid side
    /// (Biot number `alpha l / D`).
    Film { alpha_m_per_s: f64 },
}

/// A drying-by-diffusion problem.
#[derive(Debug, Clone, PartialEq)]
pub struct DiffusionProblem {
    pub body: Body,
    /// Initial uniform moisture, dry basis.
    pub x_initial: f64,
    /// Equilibrium moisture with the drying air, dry basis.
    pub x_equilibrium: f64,
    pub diffusivity: Diffusivity,
    pub temperature: ProductTemperature,
    pub surface: Surface,
    /// Shrinkage coefficient `b` (0 = none); volume `V/V0 = (1 + b X)/(1 + b X0)`.
    pub shrinkage: f64,
}

/// Numerical settings.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct SolverSettings {
    /// Number of cells.
    pub cells: usize,
    /// Ratio of the largest (centre) to the smallest (surface) cell; cell
    /// sizes grow geometrically inward. 1 gives a uniform mesh.
    pub grading: f64,
    /// Relative local error target per step.
    pub rel_tol: f64,
    /// Stop when the mean moisture ratio reaches this.
    pub target_ratio: f64,
    /// Give up (error) beyond this time, s.
    pub max_time_s: f64,
    /// Give up (error) beyond this many steps.
    pub max_steps: usize,
}

impl Default for SolverSettings {
    fn default() -> Self {
        SolverSettings {
            cells: 100,
            grading: 30.0,
            rel_tol: 2e-6,
            target_ratio: 0.01,
            max_time_s: 1e9,
            max_steps: 100_000,
        }
    }
}

/// The result of a run: the drying curve and the time to the target.
#[derive(Debug, Clone, PartialEq)]
pub struct DiffusionRun {
    /// Times of accepted steps, s (starting at 0).
    pub times_s: Vec<f64>,
    /// Mean moisture ratio at those times.
    pub ratios: Vec<f64>,
    /// Time at which the target ratio was crossed, s (interpolated in ln MR).
    pub time_to_target_s: f64,
    /// Moisture profile at the end, centre to surface, dry basis.
    pub final_profile: Vec<f64>,
    /// Diffusion length at the end (after shrinkage), m.
    pub final_length_m: f64,
    /// Accepted steps, rejected steps, Newton iterations.
    pub steps: usize,
    pub rejected: usize,
    pub newton_iterations: usize,
}

/// Solve the problem until the mean moisture ratio reaches the target.
pub fn solve_drying(
    problem: &DiffusionProblem,
    settings: &SolverSettings,
) -> Result<DiffusionRun, KineticsError> {
    validate(problem, settings)?;
    let mut grid = Grid::new(problem, settings.cells, settings.grading);
    Stepper::new(problem, settings, &mut grid).run()
}

fn validate(p: &DiffusionProblem, s: &SolverSettings) -> Result<(), KineticsError> {
    non_negative("equilibrium moisture", p.x_equilibrium)?;
    if !(p.x_initial.is_finite() && p.x_initial > p.x_equilibrium) {
        return Err(KineticsError::OutOfRange {
            name: "initial moisture",
            value: p.x_initial,
            reason: "must exceed the equilibrium moisture",
        });
    }
    let d = p.diffusivity.reference_m2_per_s;
    if !(d.is_finite() && d > 0.0) {
        return Err(KineticsError::NegativeDiffusivity { value: d });
    }
    p.temperature.validate()?;
    if let Surface::Film { alpha_m_per_s } = p.surface {
        positive("surface mass-transfer coefficient", alpha_m_per_s)?;
    }
    non_negative("shrinkage coefficient", p.shrinkage)?;
    if s.cells < 3 || s.cells > 100_000 {
        return Err(KineticsError::OutOfRange {
            name: "cells",
            value: s.cells as f64,
            reason: "use 3 to 100000 cells",
        });
    }
    positive("relative tolerance", s.rel_tol)?;
    if !(s.grading.is_finite() && (1.0..=1e4).contains(&s.grading)) {
        return Err(KineticsError::OutOfRange {
            name: "mesh grading",
            value: s.grading,
            reason: "use a ratio from 1 to 10000",
        });
    }
    if !(s.target_ratio > 0.0 && s.target_ratio < 1.0) {
        return Err(KineticsError::OutOfRange {
            name: "target moisture ratio",
            value: s.target_ratio,
            reason: "must lie strictly between 0 and 1",
        });
    }
    positive("maximum time", s.max_time_s).map(|_| ())
}

/// The mesh: fixed solid content per cell, faces moving with shrinkage.
struct Grid {
    exponent: i32,
    /// Solid content of each cell (initial volume measure, r^(s+1)/(s+1) units).
    solid: Vec<f64>,
    total_solid: f64,
    /// Face radii (N faces: outer face of each cell) and cell centres.
    faces: Vec<f64>,
    centres: Vec<f64>,
    x0: f64,
    shrinkage: f64,
}

impl Grid {
    fn new(p: &DiffusionProblem, cells: usize, grading: f64) -> Grid {
        let s = p.body.shape.exponent() as i32;
        let faces = face_radii(p.body.length_m, cells, grading);
        let measure = |r: f64| r.powi(s + 1) / f64::from(s + 1);
        let mut solid = Vec::with_capacity(cells);
        let mut centres = Vec::with_capacity(cells);
        let mut inner = 0.0;
        for &outer in &faces {
            solid.push(measure(outer) - measure(inner));
            centres.push(0.5 * (inner + outer));
            inner = outer;
        }
        let total_solid = solid.iter().sum();
        Grid {
            exponent: s,
            solid,
            total_solid,
            faces,
            centres,
            x0: p.x_initial,
            shrinkage: p.shrinkage,
        }
    }

    /// Relative specific volume `v(X)` and dry-solid density `1/v`.
    fn volume(&self, x: f64) -> f64 {
        (1.0 + self.shrinkage * x) / (1.0 + self.shrinkage * self.x0)
    }

    fn density(&self, x: f64) -> f64 {
        1.0 / self.volume(x)
    }

    fn density_slope(&self, x: f64) -> f64 {
        -self.shrinkage / (1.0 + self.shrinkage * x) * self.density(x)
    }

    /// Recompute face radii and centres for moisture `x` (shrinkage only).
    fn update(&mut self, x: &[f64]) {
        if self.shrinkage == 0.0 {
            return;
        }
        let s1 = f64::from(self.exponent + 1);
        let mut cumulative = 0.0;
        let mut inner = 0.0;
        for (i, &xi) in x.iter().enumerate() {
            cumulative += self.solid[i] * self.volume(xi);
            let outer = (s1 * cumulative).powf(1.0 / s1);
            self.faces[i] = outer;
            self.centres[i] = 0.5 * (inner + outer);
            inner = outer;
        }
    }

    fn area(&self, r: f64) -> f64 {
        r.powi(self.exponent)
    }

    fn mean(&self, x: &[f64]) -> f64 {
        x.iter().zip(&self.solid).map(|(a, b)| a * b).sum::<f64>() / self.total_solid
    }
}

/// Outer face radii of `cells` cells on [0, length], sizes growing
/// geometrically from the surface inward so that largest/smallest = `grading`.
pub fn face_radii(length: f64, cells: usize, grading: f64) -> Vec<f64> {
    let q = if cells > 1 {
        grading.powf(1.0 / (cells - 1) as f64)
    } else {
        1.0
    };
    // sizes from the centre outward: h_i = h_surface * q^(cells - 1 - i)
    let sizes: Vec<f64> = (0..cells).map(|i| q.powi((cells - 1 - i) as i32)).collect();
    let total: f64 = sizes.iter().sum();
    let mut r = 0.0;
    let mut faces: Vec<f64> = sizes
        .iter()
        .map(|h| {
            r += h * length / total;
            r
        })
        .collect();
    if let Some(last) = faces.last_mut() {
        *last = length;
    }
    faces
}

/// Right-hand side and tridiagonal Jacobian of `dX/dt = f(X)`.
struct Rhs {
    f: Vec<f64>,
    lower: Vec<f64>,
    diag: Vec<f64>,
    upper: Vec<f64>,
    d: Vec<f64>,
    dd: Vec<f64>,
}

impl Rhs {
    fn new(n: usize) -> Rhs {
        Rhs {
            f: vec![0.0; n],
            lower: vec![0.0; n],
            diag: vec![0.0; n],
            upper: vec![0.0; n],
            d: vec![0.0; n],
            dd: vec![0.0; n],
        }
    }

    /// Evaluate f and its Jacobian at `x`, time `t` (s).
    fn eval(&mut self, p: &DiffusionProblem, grid: &Grid, x: &[f64], t: f64) {
        let n = x.len();
        let temp = p.temperature.at(t);
        let thermal = p.diffusivity.thermal_factor(temp);
        let a = p.diffusivity.moisture_coefficient;
        for (i, &xi) in x.iter().enumerate() {
            let d = p.diffusivity.at_scaled(xi, thermal);
            self.d[i] = d;
            self.dd[i] = a * d;
        }
        for v in [
            &mut self.f,
            &mut self.lower,
            &mut self.diag,
            &mut self.upper,
        ] {
            v.fill(0.0);
        }
        for j in 0..n - 1 {
            let (flux, d_left, d_right) = self.interior_flux(grid, x, j);
            self.add_face(grid, j, flux, d_left, Some(d_right));
        }
        let (flux, d_left) = self.surface_flux(p, grid, x, temp);
        self.add_face(grid, n - 1, flux, d_left, None);
    }

    /// Outward flux through the face after cell j and its derivatives.
    fn interior_flux(&self, grid: &Grid, x: &[f64], j: usize) -> (f64, f64, f64) {
        let a = grid.area(grid.faces[j]) / (grid.centres[j + 1] - grid.centres[j]);
        let (rho_l, rho_r) = (grid.density(x[j]), grid.density(x[j + 1]));
        let rho = 0.5 * (rho_l + rho_r);
        let d = 0.5 * (self.d[j] + self.d[j + 1]);
        let k = rho * d;
        let gap = x[j] - x[j + 1];
        let dk_l = 0.5 * grid.density_slope(x[j]) * d + rho * 0.5 * self.dd[j];
        let dk_r = 0.5 * grid.density_slope(x[j + 1]) * d + rho * 0.5 * self.dd[j + 1];
        (a * k * gap, a * (k + gap * dk_l), a * (-k + gap * dk_r))
    }

    /// Outward flux through the surface and its derivative in X_N.
    fn surface_flux(&self, p: &DiffusionProblem, grid: &Grid, x: &[f64], temp: f64) -> (f64, f64) {
        let n = x.len() - 1;
        let xe = p.x_equilibrium;
        let area = grid.area(grid.faces[n]);
        let half = grid.faces[n] - grid.centres[n];
        let gap = x[n] - xe;
        match p.surface {
            Surface::Equilibrium => {
                let rho = 0.5 * (grid.density(x[n]) + grid.density(xe));
                let d = 0.5 * (self.d[n] + p.diffusivity.at(xe, temp));
                let dk = 0.5 * grid.density_slope(x[n]) * d + rho * 0.5 * self.dd[n];
                let a = area / half;
                (a * rho * d * gap, a * (rho * d + gap * dk))
            }
            Surface::Film { alpha_m_per_s } => {
                let resistance = half / self.d[n] + 1.0 / alpha_m_per_s;
                let rho = grid.density(x[n]);
                let q = rho / resistance;
                let dq = grid.density_slope(x[n]) / resistance
                    + rho * (half * self.dd[n] / (self.d[n] * self.d[n]))
                        / (resistance * resistance);
                (area * q * gap, area * (q + gap * dq))
            }
        }
    }

    /// Apply face j's flux to cells j (loses) and j+1 (gains).
    fn add_face(&mut self, grid: &Grid, j: usize, flux: f64, d_left: f64, d_right: Option<f64>) {
        let inv_l = 1.0 / grid.solid[j];
        self.f[j] -= flux * inv_l;
        self.diag[j] -= d_left * inv_l;
        if let Some(d_right) = d_right {
            let inv_r = 1.0 / grid.solid[j + 1];
            self.upper[j] -= d_right * inv_l;
            self.f[j + 1] += flux * inv_r;
            self.lower[j + 1] += d_left * inv_r;
            self.diag[j + 1] += d_right * inv_r;
        }
    }
}

/// Solve a tridiagonal system in place (Thomas algorithm); `rhs` becomes the solution.
fn solve_tridiagonal(
    lower: &[f64],
    diag: &[f64],
    upper: &[f64],
    rhs: &mut [f64],
    scratch: &mut [f64],
) -> bool {
    let n = rhs.len();
    let mut beta = diag[0];
    if beta == 0.0 {
        return false;
    }
    rhs[0] /= beta;
    for i in 1..n {
        scratch[i] = upper[i - 1] / beta;
        beta = diag[i] - lower[i] * scratch[i];
        if beta == 0.0 || !beta.is_finite() {
            return false;
        }
        rhs[i] = (rhs[i] - lower[i] * rhs[i - 1]) / beta;
    }
    for i in (0..n - 1).rev() {
        rhs[i] -= scratch[i + 1] * rhs[i + 1];
    }
    true
}

/// The BDF2 integrator state.
struct Stepper<'a> {
    p: &'a DiffusionProblem,
    s: &'a SolverSettings,
    grid: &'a mut Grid,
    rhs: Rhs,
    /// Last three accepted (t, X) states, newest last.
    history: Vec<(f64, Vec<f64>)>,
    weights: Vec<f64>,
    /// Newton scratch space.
    work: Work,
    /// Last measured Newton contraction rate and steps since it was measured.
    contraction: f64,
    since_check: usize,
    run: DiffusionRun,
}

/// Outcome of one attempted step.
enum Attempt {
    Accepted { x: Vec<f64>, error: f64 },
    Rejected { error: f64 },
    NewtonFailed,
}

impl<'a> Stepper<'a> {
    fn new(p: &'a DiffusionProblem, s: &'a SolverSettings, grid: &'a mut Grid) -> Stepper<'a> {
        let x0 = vec![p.x_initial; s.cells];
        Stepper {
            p,
            s,
            grid,
            rhs: Rhs::new(s.cells),
            history: vec![(0.0, x0)],
            weights: vec![0.0; s.cells],
            work: Work::default(),
            contraction: 1.0,
            since_check: 0,
            run: DiffusionRun {
                times_s: vec![0.0],
                ratios: vec![1.0],
                time_to_target_s: f64::NAN,
                final_profile: Vec::new(),
                final_length_m: p.body.length_m,
                steps: 0,
                rejected: 0,
                newton_iterations: 0,
            },
        }
    }

    fn ratio(&self, x: &[f64]) -> f64 {
        (self.grid.mean(x) - self.p.x_equilibrium) / (self.p.x_initial - self.p.x_equilibrium)
    }

    fn run(mut self) -> Result<DiffusionRun, KineticsError> {
        let l = self.p.body.length_m;
        let d0 = self
            .p
            .diffusivity
            .at(self.p.x_initial, self.p.temperature.at(0.0));
        let mut h = 1e-7 * l * l / d0;
        loop {
            let (t, _) = self.last();
            if self.run.steps >= self.s.max_steps || t > self.s.max_time_s {
                return Err(KineticsError::NoConvergence {
                    what: "diffusion solver",
                    detail: format!(
                        "moisture ratio {:.4} after {} steps and {:.4e} s; target {}",
                        self.run.ratios.last().copied().unwrap_or(1.0),
                        self.run.steps,
                        t,
                        self.s.target_ratio
                    ),
                });
            }
            match self.attempt(h) {
                Attempt::Accepted { x, error } => {
                    if self.accept(t + h, x) {
                        return Ok(self.finish());
                    }
                    h *= step_factor(error).min(if self.history.len() < 3 { 1.5 } else { 2.0 });
                }
                Attempt::Rejected { error } => {
                    self.run.rejected += 1;
                    h *= step_factor(error).max(0.1);
                }
                Attempt::NewtonFailed => {
                    self.run.rejected += 1;
                    h *= 0.25;
                }
            }
            if !(h.is_finite() && h > 1e-14 * (t + l * l / d0)) {
                return Err(KineticsError::NoConvergence {
                    what: "diffusion solver",
                    detail: format!("step size collapsed at t = {t:.4e} s"),
                });
            }
        }
    }

    fn last(&self) -> (f64, &[f64]) {
        let (t, x) = &self.history[self.history.len() - 1];
        (*t, x)
    }

    /// Record an accepted state; true when the target has been crossed.
    fn accept(&mut self, t: f64, x: Vec<f64>) -> bool {
        self.run.steps += 1;
        let ratio = self.ratio(&x);
        let (t_prev, r_prev) = (
            self.run.times_s[self.run.times_s.len() - 1],
            self.run.ratios[self.run.ratios.len() - 1],
        );
        self.run.times_s.push(t);
        self.run.ratios.push(ratio);
        if self.history.len() == 3 {
            self.history.remove(0);
        }
        self.history.push((t, x));
        if ratio <= self.s.target_ratio {
            let target = self.s.target_ratio.ln();
            let (a, b) = (r_prev.max(1e-300).ln(), ratio.max(1e-300).ln());
            self.run.time_to_target_s = if a == b {
                t
            } else {
                t_prev + (t - t_prev) * (a - target) / (a - b)
            };
            return true;
        }
        false
    }

    fn finish(mut self) -> DiffusionRun {
        let (_, x) = self.last();
        let x = x.to_vec();
        self.grid.update(&x);
        self.run.final_length_m = self.grid.faces[x.len() - 1];
        self.run.final_profile = x;
        self.run
    }

    /// Error weights: rel_tol times the free moisture, floored at 1e-3 of the initial free moisture.
    fn set_weights(&mut self) {
        let span = self.p.x_initial - self.p.x_equilibrium;
        let (xe, rel_tol) = (self.p.x_equilibrium, self.s.rel_tol);
        let x = &self.history[self.history.len() - 1].1;
        for (w, xi) in self.weights.iter_mut().zip(x) {
            *w = rel_tol * ((xi - xe).abs() + 1e-3 * span);
        }
    }

    /// Weighted RMS norm of `a - b`.
    fn norm_between(&self, a: &[f64], b: &[f64]) -> f64 {
        let sum: f64 = a
            .iter()
            .zip(b)
            .zip(&self.weights)
            .map(|((x, y), w)| ((x - y) / w).powi(2))
            .sum();
        (sum / a.len() as f64).sqrt()
    }

    fn norm(&self, v: &[f64]) -> f64 {
        (v.iter()
            .zip(&self.weights)
            .map(|(a, w)| (a / w).powi(2))
            .sum::<f64>()
            / v.len() as f64)
            .sqrt()
    }

    /// Try one step of size h from the newest state.
    fn attempt(&mut self, h: f64) -> Attempt {
        let (t, _) = self.last();
        self.set_weights();
        let scheme = Scheme::new(&self.history, h);
        let predictor = self.predict(&scheme, h);
        let Some(x) = self.newton(&scheme, t + h, predictor.clone()) else {
            return Attempt::NewtonFailed;
        };
        let error = scheme.milne * self.norm_between(&x, &predictor);
        if error <= 1.0 && x.iter().all(|v| v.is_finite()) {
            Attempt::Accepted { x, error }
        } else {
            Attempt::Rejected { error }
        }
    }

    /// Predictor: explicit Euler for the first step, else extrapolation of
    /// the polynomial through the stored states.
    fn predict(&mut self, scheme: &Scheme, h: f64) -> Vec<f64> {
        let (t, x_n) = self.last();
        if self.history.len() == 1 {
            let x_n = x_n.to_vec();
            self.grid.update(&x_n);
            self.rhs.eval(self.p, self.grid, &x_n, t);
            return x_n
                .iter()
                .zip(&self.rhs.f)
                .map(|(x, f)| x + h * f)
                .collect();
        }
        let mut out = vec![0.0; x_n.len()];
        for (weight, (_, state)) in scheme.extrapolation.iter().zip(&self.history) {
            for (o, v) in out.iter_mut().zip(state) {
                *o += weight * v;
            }
        }
        out
    }

    /// Newton iteration on `X - sum(a_k X_k) - gamma h f(X) = 0`.
    fn newton(&mut self, scheme: &Scheme, t_new: f64, x: Vec<f64>) -> Option<Vec<f64>> {
        let mut work = std::mem::take(&mut self.work);
        let out = self.newton_in(&mut work, scheme, t_new, x);
        self.work = work;
        out
    }

    fn newton_in(
        &mut self,
        w: &mut Work,
        scheme: &Scheme,
        t_new: f64,
        mut x: Vec<f64>,
    ) -> Option<Vec<f64>> {
        let n = x.len();
        w.resize(n);
        let Work {
            base,
            scratch,
            residual,
            lower,
            diag,
            upper,
        } = w;
        base.fill(0.0);
        for (a, (_, state)) in scheme.history_weights.iter().zip(&self.history) {
            for (b, v) in base.iter_mut().zip(state) {
                *b += a * v;
            }
        }
        let gh = scheme.gamma * scheme.h;
        let mut previous = f64::INFINITY;
        for iteration in 0..8 {
            self.run.newton_iterations += 1;
            self.grid.update(&x);
            self.rhs.eval(self.p, self.grid, &x, t_new);
            for i in 0..n {
                residual[i] = -(x[i] - base[i] - gh * self.rhs.f[i]);
                lower[i] = -gh * self.rhs.lower[i];
                diag[i] = 1.0 - gh * self.rhs.diag[i];
                upper[i] = -gh * self.rhs.upper[i];
            }
            if !solve_tridiagonal(lower, diag, upper, residual, scratch) {
                return None;
            }
            x.iter_mut().zip(residual.iter()).for_each(|(a, d)| *a += d);
            let size = self.norm(residual);
            if !size.is_finite() || (size > previous && size > 1.0) {
                return None;
            }
            if iteration == 0 {
                // Accept one iteration when the last measured contraction
                // rate says the next correction would be negligible; measure
                // the rate again at least every 10 steps.
                if self.contraction * size < 1e-2 && self.since_check < 10 {
                    self.since_check += 1;
                    return Some(x);
                }
            } else {
                self.contraction = (size / previous).max(1e-8);
                self.since_check = 0;
                if size < 1e-3
                    || self.contraction * size / (1.0 - self.contraction).max(1e-3) < 1e-3
                {
                    return Some(x);
                }
            }
            previous = size;
        }
        None
    }
}

/// Scratch vectors of the Newton iteration, reused between steps.
#[derive(Default)]
struct Work {
    base: Vec<f64>,
    scratch: Vec<f64>,
    residual: Vec<f64>,
    lower: Vec<f64>,
    diag: Vec<f64>,
    upper: Vec<f64>,
}

impl Work {
    fn resize(&mut self, n: usize) {
        for v in [
            &mut self.base,
            &mut self.scratch,
            &mut self.residual,
            &mut self.lower,
            &mut self.diag,
            &mut self.upper,
        ] {
            v.resize(n, 0.0);
        }
    }
}

/// Coefficients of one variable-step BDF2 (or backward Euler) step.
struct Scheme {
    h: f64,
    gamma: f64,
    /// Weights on the stored states (oldest first) in the BDF formula.
    history_weights: Vec<f64>,
    /// Weights on the stored states for the predictor.
    extrapolation: Vec<f64>,
    /// Milne factor turning (corrector - predictor) into the local error.
    milne: f64,
}

impl Scheme {
    fn new(history: &[(f64, Vec<f64>)], h: f64) -> Scheme {
        let times: Vec<f64> = history.iter().map(|(t, _)| *t).collect();
        match times.len() {
            1 => Scheme {
                h,
                gamma: 1.0,
                history_weights: vec![1.0],
                extrapolation: vec![1.0],
                milne: 0.5,
            },
            2 => {
                // Backward Euler with a linear predictor: errors h^2/2 and h(h+h1)/2.
                let h1 = times[1] - times[0];
                let w = h / h1;
                let extrapolation = vec![-w, 1.0 + w];
                let milne = h / (h + (h + h1));
                Scheme {
                    h,
                    gamma: 1.0,
                    history_weights: vec![0.0, 1.0],
                    extrapolation,
                    milne,
                }
            }
            _ => Scheme::bdf2(&times, h),
        }
    }

    fn bdf2(times: &[f64], h: f64) -> Scheme {
        let (t0, t1, t2) = (times[0], times[1], times[2]);
        let h1 = t2 - t1;
        let h2 = t1 - t0;
        let w = h / h1;
        let gamma = (1.0 + w) / (1.0 + 2.0 * w);
        let a1 = (1.0 + w) * (1.0 + w) / (1.0 + 2.0 * w);
        let a2 = -w * w / (1.0 + 2.0 * w);
        let t = t2 + h;
        // Lagrange extrapolation through (t0, t1, t2) evaluated at t.
        let l0 = (t - t1) * (t - t2) / ((t0 - t1) * (t0 - t2));
        let l1 = (t - t0) * (t - t2) / ((t1 - t0) * (t1 - t2));
        let l2 = (t - t0) * (t - t1) / ((t2 - t0) * (t2 - t1));
        let milne = gamma * h / (gamma * h + h + h1 + h2);
        Scheme {
            h,
            gamma,
            history_weights: vec![0.0, a2, a1],
            extrapolation: vec![l0, l1, l2],
            milne,
        }
    }
}

/// Step-size factor for a local error `error` (order 2: exponent 1/3).
fn step_factor(error: f64) -> f64 {
    if error <= 1e-10 {
        4.0
    } else {
        (0.9 * error.powf(-1.0 / 3.0)).clamp(0.1, 4.0)
    }
}

#[cfg(test)]
mod tests {
    use super::super::{CrankSeries, Shape};
    use super::*;

    fn problem(shape: Shape, surface: Surface) -> DiffusionProblem {
        DiffusionProblem {
            body: Body {
                shape,
                length_m: 0.004,
            },
            x_initial: 2.0,
            x_equilibrium: 0.1,
            diffusivity: Diffusivity {
                reference_m2_per_s: 5e-10,
                activation_energy_j_per_mol: 0.0,
                reference_temperature_k: 300.0,
                moisture_coefficient: 0.0,
                reference_moisture: 0.0,
            },
            temperature: ProductTemperature::Constant(330.0),
            surface,
            shrinkage: 0.0,
        }
    }

    /// Worst relative MR error against Crank's series over MR 1..0.01.
    fn worst_error(p: &DiffusionProblem, biot: Option<f64>) -> (f64, DiffusionRun) {
        let run = solve_drying(p, &SolverSettings::default()).unwrap();
        let series = CrankSeries::new(p.body.shape, biot, 1e-8).unwrap();
        let d = p.diffusivity.reference_m2_per_s;
        let worst = run
            .times_s
            .iter()
            .zip(&run.ratios)
            .filter(|(_, r)| **r >= 0.01)
            .map(|(t, r)| (r / series.moisture_ratio(p.body.fourier(d, *t)) - 1.0).abs())
            .fold(0.0, f64::max);
        (worst, run)
    }

    /// Source: J. Crank, The Mathematics of Diffusion (1975), ch. 4-6 series
    /// (our series is itself cross-checked against scipy in tests/reference).
    #[test]
    fn matches_crank_with_surface_at_equilibrium() {
        for shape in [Shape::Slab, Shape::Cylinder, Shape::Sphere] {
            let p = problem(shape, Surface::Equilibrium);
            let (worst, run) = worst_error(&p, None);
            assert!(
                worst < 1e-3,
                "{shape:?}: worst relative MR error {worst:.2e} over {} steps",
                run.steps
            );
            let series = CrankSeries::new(shape, None, 1e-8).unwrap();
            let t_exact = series.fourier_for_ratio(0.01).unwrap() * 0.004f64.powi(2) / 5e-10;
            assert!(
                (run.time_to_target_s / t_exact - 1.0).abs() < 1e-3,
                "{shape:?}: {} vs {t_exact}",
                run.time_to_target_s
            );
        }
    }

    #[test]
    fn matches_crank_with_surface_film() {
        for shape in [Shape::Slab, Shape::Cylinder, Shape::Sphere] {
            for biot in [0.5, 5.0, 50.0] {
                let alpha = biot * 5e-10 / 0.004;
                let p = problem(
                    shape,
                    Surface::Film {
                        alpha_m_per_s: alpha,
                    },
                );
                let (worst, run) = worst_error(&p, Some(biot));
                assert!(
                    worst < 1e-3,
                    "{shape:?} Bi {biot}: worst relative MR error {worst:.2e} over {} steps",
                    run.steps
                );
            }
        }
    }
}

#[cfg(test)]
mod time_and_shrinkage_tests {
    use super::super::super::integrate::gauss_kronrod;
    use super::super::{CrankSeries, Shape};
    use super::*;

    /// Fo(t) = integral of D(T(t')) dt' / L^2 by adaptive quadrature.
    fn fourier_integral(p: &DiffusionProblem, t: f64) -> f64 {
        let d = |tau: f64| p.diffusivity.at(p.x_equilibrium, p.temperature.at(tau));
        let split = 10_800f64.min(t);
        let a = gauss_kronrod(d, 0.0, split, 1e-12, 0.0).map_or(f64::NAN, |q| q.value);
        let b = gauss_kronrod(d, split, t, 1e-12, 0.0).map_or(f64::NAN, |q| q.value);
        (a + b) / (p.body.length_m * p.body.length_m)
    }

    fn base() -> DiffusionProblem {
        DiffusionProblem {
            body: Body {
                shape: Shape::Slab,
                length_m: 0.004,
            },
            x_initial: 2.0,
            x_equilibrium: 0.1,
            diffusivity: Diffusivity {
                reference_m2_per_s: 3e-10,
                activation_energy_j_per_mol: 35_000.0,
                reference_temperature_k: 323.15,
                moisture_coefficient: 0.0,
                reference_moisture: 0.1,
            },
            temperature: ProductTemperature::Constant(323.15),
            surface: Surface::Equilibrium,
            shrinkage: 0.0,
        }
    }

    /// A D that depends on time only keeps Crank's solution with
    /// Fo = integral of D dt / L^2 (Crank 1975, sec. 7.1, time-dependent
    /// diffusion coefficient). Product heated from 40 to 80 degC over 3 h.
    #[test]
    fn temperature_schedule_matches_series_in_integrated_time() {
        let mut p = base();
        p.temperature = ProductTemperature::Schedule(vec![(0.0, 313.15), (10_800.0, 353.15)]);
        let run = solve_drying(&p, &SolverSettings::default()).unwrap();
        let series = CrankSeries::new(Shape::Slab, None, 1e-8).unwrap();
        let worst = run
            .times_s
            .iter()
            .zip(&run.ratios)
            .filter(|(_, r)| **r >= 0.01)
            .map(|(t, r)| {
                let fo = fourier_integral(&p, *t);
                (r / series.moisture_ratio(fo) - 1.0).abs()
            })
            .fold(0.0, f64::max);
        assert!(worst < 1e-3, "worst relative MR error {worst:.2e}");
    }

    /// Shrinkage shortens the diffusion path: drying is faster than for a
    /// rigid body with the same D, the final size follows the volume law,
    /// and the result converges under mesh and tolerance refinement.
    #[test]
    fn shrinkage_speeds_drying_and_converges() {
        let mut p = base();
        p.diffusivity.activation_energy_j_per_mol = 0.0;
        let rigid = solve_drying(&p, &SolverSettings::default()).unwrap();
        p.shrinkage = 1.3;
        let coarse = solve_drying(&p, &SolverSettings::default()).unwrap();
        let fine = solve_drying(
            &p,
            &SolverSettings {
                cells: 300,
                rel_tol: 2e-7,
                ..SolverSettings::default()
            },
        )
        .unwrap();
        assert!(
            coarse.time_to_target_s < 0.9 * rigid.time_to_target_s,
            "{} vs {}",
            coarse.time_to_target_s,
            rigid.time_to_target_s
        );
        assert!((coarse.time_to_target_s / fine.time_to_target_s - 1.0).abs() < 1e-3);
        let mean = 0.1 + 0.01 * (2.0 - 0.1);
        let expected = 0.004 * (1.0 + 1.3 * mean) / (1.0 + 1.3 * 2.0);
        assert!(
            (coarse.final_length_m / expected - 1.0).abs() < 0.02,
            "{} vs {expected}",
            coarse.final_length_m
        );
    }

    #[test]
    fn bad_problems_are_errors() {
        let mut p = base();
        p.diffusivity.reference_m2_per_s = -1e-10;
        assert!(matches!(
            solve_drying(&p, &SolverSettings::default()),
            Err(KineticsError::NegativeDiffusivity { .. })
        ));
        let mut p = base();
        p.x_initial = 0.05;
        assert!(solve_drying(&p, &SolverSettings::default()).is_err());
        let s = SolverSettings {
            target_ratio: 0.0,
            ..SolverSettings::default()
        };
        assert!(solve_drying(&base(), &s).is_err());
    }
}
