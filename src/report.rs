//! Readable reports of the headless commands, and their JSON objects (built in the
//! profile crate, shared with the Python package).

use quenchless_physics::axes::{AxisReport, worst_axis};
use quenchless_physics::constants::TWO_PI;
use quenchless_physics::cycle::CycleReport;
use quenchless_physics::{Ramp, RampReport};
use quenchless_profile::convert::TrapModel;
use std::fmt::Write;

// The JSON objects live in the profile crate so the Python package emits the same ones.
pub use quenchless_profile::report::{EvalJson, SCHEMA_VERSION, cycle_json, eval_json, versioned, with_axes};

/// Readable lines for every axis of a multi-axis trap, worst axis named.
pub fn axes_text(axes: &[AxisReport], model: &TrapModel) -> String {
    let mut s = String::new();
    let worst = worst_axis(axes).unwrap_or(0);
    if let Some(w) = axes.get(worst) {
        let _ = writeln!(
            s,
            "  trap verdict       {} (worst axis: {}, Q* - 1 = {:.3e})",
            w.report.verdict().word(),
            w.name,
            w.report.q_star_minus_one
        );
    }
    for (a, m) in axes.iter().zip(&model.axes) {
        let _ = writeln!(
            s,
            "  axis {:<13} {:<13} Q* - 1 = {:.3e}, {:.4} kHz -> {:.4} kHz, start occupation {:.4}, {}",
            a.name,
            a.report.verdict().word(),
            a.report.q_star_minus_one,
            khz(a.report.omega_initial_rad_s),
            khz(a.report.omega_final_rad_s),
            a.occupation,
            quenchless_profile::convert::well_words(&m.well)
        );
    }
    s
}

fn khz(omega: f64) -> f64 {
    omega / TWO_PI / 1e3
}

/// Readable report of one evaluated ramp.
pub fn eval_text(name: &str, ramp: &Ramp, r: &RampReport) -> String {
    let mut s = String::new();
    let verdict = format!(
        "{}{}",
        r.verdict().word(),
        if r.energy_diagonal { " (energy-diagonal)" } else { " (not energy-diagonal)" }
    );
    let q_name = if r.q_star_is_energy_ratio { "energy ratio (noise on)" } else { "Husimi Q*" };
    let _ = writeln!(s, "{name} ({})", ramp.family_name());
    let _ = writeln!(
        s,
        "  verdict            {verdict}: Q* - 1 = {:.3e} (tolerance {:.1e})",
        r.q_star_minus_one, r.tolerance
    );
    let _ = writeln!(s, "  {q_name:<18} {:.12}", r.q_star);
    let _ = writeln!(
        s,
        "  frequencies        {:.4} kHz -> {:.4} kHz in {:.6} us",
        khz(r.omega_initial_rad_s),
        khz(r.omega_final_rad_s),
        r.duration_s * 1e6
    );
    let _ = writeln!(s, "  final coherence    {:.3e} (sqrt(L²+C²)/H)", r.final_coherence_ratio);
    let _ = writeln!(s, "  final energy       {:.6} quanta of the final trap", r.final_energy_quanta);
    let _ = writeln!(
        s,
        "  work on oscillator {:.6} quanta of the initial trap (friction part {:.3e})",
        r.work_quanta, r.friction_work_quanta
    );
    let _ = writeln!(s, "  peak energy        {:.4} quanta", r.peak_energy_quanta);
    let inv = if r.inverts() { "  (trap inverts)" } else { "" };
    let _ =
        writeln!(s, "  min omega²         {:.4e} (rad/s)² at {:.4} us{inv}", r.min_omega2, r.min_omega2_time_s * 1e6);
    let _ = writeln!(s, "  Casimir drift      {:.2e}", r.casimir_drift);
    if r.within_limits() {
        let _ = writeln!(s, "  limits             respected (stated bounds and slew)");
    }
    for v in &r.violations {
        let tag = if v.kind == quenchless_physics::ViolationKind::Inverted { "INVERTED" } else { "LIMIT BROKEN" };
        let worst = v.worst_as_stated().map_or_else(|| "a jump".to_string(), |(w, unit)| format!("{w:.4e} {unit}"));
        let _ = writeln!(
            s,
            "  {tag:<18} {} from {:.4} us to {:.4} us (worst {worst})",
            v.kind.describe(),
            v.start * 1e6,
            v.end * 1e6
        );
    }
    s
}

/// Readable report of a cycle.
pub fn cycle_text(name: &str, r: &CycleReport) -> String {
    let mut s = String::new();
    let _ = writeln!(s, "{name}: Otto cycle");
    let _ = writeln!(
        s,
        "  spectral radius    {:.6} ({})",
        r.spectral_radius,
        if r.stable {
            "stable: a limit cycle exists"
        } else {
            "UNSTABLE: energy grows cycle after cycle (parametric heating); no limit cycle"
        }
    );
    let _ = writeln!(s, "  cycle time         {:.6} us", r.cycle_time_s * 1e6);
    let _ = writeln!(s, "  Otto efficiency    {:.6} (1 - omega_c/omega_h)", r.otto_efficiency);
    if let Some(f) = &r.figures {
        let _ = writeln!(s, "  regime             {}", f.regime.name());
        let _ = writeln!(s, "  work delivered     {:.6} hbar omega_h per cycle", f.work_out_quanta);
        let _ = writeln!(s, "  heat from hot      {:.6} hbar omega_h", f.heat_hot_quanta);
        let _ = writeln!(s, "  heat from cold     {:.6} hbar omega_h", f.heat_cold_quanta);
        if let Some(e) = f.efficiency {
            let _ = writeln!(s, "  efficiency         {e:.6}");
        }
        if let Some(c) = f.cop {
            let _ = writeln!(s, "  COP                {c:.6}");
        }
        let _ = writeln!(s, "  power              {:.6e} W", f.power_w);
        for c in &f.corners {
            let _ = writeln!(
                s,
                "  {:<20} omega {:.4} kHz  H {:.5}  L {:+.5}  C {:+.5} (hbar omega)",
                c.label,
                khz(c.omega_rad_s),
                c.energy_quanta,
                c.l_quanta,
                c.c_quanta
            );
        }
        let _ = writeln!(s, "  fixed-point residual {:.2e}", f.residual);
    }
    s
}
