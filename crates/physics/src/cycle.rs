//! The quantum Otto cycle (Y. Rezek and R. Kosloff, New J. Phys. 8, 83 (2006)): hot isochore, expansion, cold
//! isochore, compression, composed into one affine map on (H, L, C); its spectral
//! radius decides stability, its fixed point is the limit cycle.

use crate::affine::AffineMap;
use crate::bath::Bath;
use crate::constants::HBAR;
use crate::error::{PhysicsError, Result, require_non_negative};
use crate::noise::Noise;
use crate::propagate::{PropagationOptions, constant_step, stroke_map};
use crate::ramp::{Ramp, RampShape};
use crate::state::{from_energy_matrix, to_energy_matrix};
use nalgebra::{Matrix3, Vector3};

/// A cycle counts as stable only when rho(A) < 1 - this margin: just below 1, I - A is
/// nearly singular and its fixed point is rounding noise (e.g. unitary strokes with no
/// bath contact give rho = 1 - 4e-15).
pub const STABILITY_MARGIN: f64 = 1e-9;

/// Relative mismatch allowed between a ramp's end frequencies and the cycle's.
pub const FREQUENCY_MATCH: f64 = 1e-6;

/// A work stroke between the two bath frequencies.
#[derive(Debug, Clone, PartialEq)]
pub enum WorkStroke {
    /// A ramp of any family; its end frequencies must match the cycle's.
    Ramp(Ramp),
    /// Sudden quench to the new frequency, then a hold there for `hold` seconds (>= 0).
    Sudden {
        /// Hold after the jump, s.
        hold: f64,
    },
    /// Ideal adiabatic stroke taking `time` seconds: every quadratic expectation
    /// scales by omega_to/omega_from (Q* = 1, no phase).
    IdealAdiabatic {
        /// Duration, s.
        time: f64,
    },
}

impl WorkStroke {
    /// Duration, s.
    pub fn duration(&self) -> f64 {
        match self {
            Self::Ramp(r) => r.duration(),
            Self::Sudden { hold } => *hold,
            Self::IdealAdiabatic { time } => *time,
        }
    }

    /// Map on (H, L, C) from omega_from to omega_to.
    fn energy_map(
        &self,
        name: &str,
        from: f64,
        to: f64,
        noise: &Noise,
        opts: &PropagationOptions,
    ) -> Result<Matrix3<f64>> {
        match self {
            Self::Ramp(r) => {
                for (end, want, got) in [("start", from, r.omega_initial()), ("end", to, r.omega_final())] {
                    if ((got - want) / want).abs() > FREQUENCY_MATCH {
                        return Err(PhysicsError::invalid(
                            format!("{name} ramp {end} frequency"),
                            format!("{got} rad/s"),
                            format!("the cycle's {want} rad/s to {FREQUENCY_MATCH:e} relative"),
                        ));
                    }
                }
                let map = stroke_map(r, noise, opts)?;
                Ok(to_energy_matrix(to) * map.moments * from_energy_matrix(from))
            }
            Self::Sudden { hold } => {
                let hold = require_non_negative(&format!("{name} hold time"), *hold)?;
                let held = if noise.is_silent() {
                    constant_step(to * to, hold).moment_map()
                } else {
                    // The hold is a fixed trap with noise: the exponential of the
                    // constant generator on (X, Y, D), to rounding.
                    (noise.generator(to * to) * hold).exp()
                };
                Ok(to_energy_matrix(to) * held * from_energy_matrix(from))
            }
            Self::IdealAdiabatic { time } => {
                require_non_negative(&format!("{name} time"), *time)?;
                Ok(Matrix3::identity() * (to / from))
            }
        }
    }
}

/// The four strokes of an Otto cycle.
#[derive(Debug, Clone, PartialEq)]
pub struct OttoCycle {
    /// Hot bath (at omega_h).
    pub hot: Bath,
    /// Hot contact time, s.
    pub hot_time: f64,
    /// Expansion omega_h -> omega_c.
    pub expansion: WorkStroke,
    /// Cold bath (at omega_c < omega_h).
    pub cold: Bath,
    /// Cold contact time, s.
    pub cold_time: f64,
    /// Compression omega_c -> omega_h.
    pub compression: WorkStroke,
    /// Noise on the trap: it acts on ramps and sudden strokes' holds and during both
    /// bath contacts (dephasing and amplitude noise alike); ideal adiabatic strokes are
    /// an idealisation and stay noiseless.
    pub noise: Noise,
}

/// Operating regime by the signs of work and heats.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Regime {
    /// W_out > 0: heat to work.
    Engine,
    /// Q_c > 0 with work in: heat pumped out of the cold bath.
    Refrigerator,
    /// Q_h < 0 and Q_c < 0: work dumped as heat into both baths.
    Heater,
    /// Q_h > 0, Q_c < 0, work in: heat flow from hot to cold sped up by work.
    Accelerator,
}

impl Regime {
    /// Lower-case name as in the JSON reports.
    pub fn name(self) -> &'static str {
        match self {
            Self::Engine => "engine",
            Self::Refrigerator => "refrigerator",
            Self::Heater => "heater",
            Self::Accelerator => "accelerator",
        }
    }
}

/// State at one corner of the limit cycle, in units of hbar omega at that corner.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Corner {
    /// Which corner.
    pub label: &'static str,
    /// Trap frequency there, rad/s.
    pub omega_rad_s: f64,
    /// H/(hbar omega).
    pub energy_quanta: f64,
    /// L/(hbar omega).
    pub l_quanta: f64,
    /// C/(hbar omega).
    pub c_quanta: f64,
}

/// Labels of the four corners, in order.
pub const CORNER_LABELS: [&str; 4] =
    ["start of hot stroke", "end of hot stroke", "end of expansion", "end of cold stroke"];

/// Figures of a stable limit cycle (per cycle; energies in units of hbar omega_h).
#[derive(Debug, Clone, PartialEq)]
pub struct CycleFigures {
    /// Operating regime.
    pub regime: Regime,
    /// Work delivered per cycle, hbar omega_h.
    pub work_out_quanta: f64,
    /// Heat into the oscillator on the hot stroke, hbar omega_h.
    pub heat_hot_quanta: f64,
    /// Heat into the oscillator on the cold stroke, hbar omega_h.
    pub heat_cold_quanta: f64,
    /// W_out/Q_h in the engine regime.
    pub efficiency: Option<f64>,
    /// Q_c/(-W_out) in the refrigerator regime.
    pub cop: Option<f64>,
    /// Average power delivered, W.
    pub power_w: f64,
    /// The four corners.
    pub corners: [Corner; 4],
    /// max |change| of (H, L, C)/(hbar omega_h) under one more cycle from the fixed point.
    pub residual: f64,
    /// The fixed point (H, L, C) at the start of the hot stroke, J.
    pub fixed_point: Vector3<f64>,
}

/// Result of analysing a cycle.
#[derive(Debug, Clone, PartialEq)]
pub struct CycleReport {
    /// rho(A) < 1 - [`STABILITY_MARGIN`]: a limit cycle exists and attracts.
    pub stable: bool,
    /// Spectral radius of the 3x3 linear part A.
    pub spectral_radius: f64,
    /// 1 - omega_c/omega_h.
    pub otto_efficiency: f64,
    /// Sum of the four stroke times, s.
    pub cycle_time_s: f64,
    /// Present only when stable.
    pub figures: Option<CycleFigures>,
}

/// The four stroke maps on (H, L, C), in order.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct CycleMaps {
    /// Hot contact.
    pub hot: AffineMap,
    /// Expansion.
    pub expansion: AffineMap,
    /// Cold contact.
    pub cold: AffineMap,
    /// Compression.
    pub compression: AffineMap,
}

impl CycleMaps {
    /// The whole cycle, starting at the start of the hot stroke.
    pub fn composed(&self) -> AffineMap {
        self.hot.then(&self.expansion).then(&self.cold).then(&self.compression)
    }
}

impl OttoCycle {
    /// Checks frequencies and times.
    pub fn validate(&self) -> Result<()> {
        let (wh, wc) = (self.hot.omega(), self.cold.omega());
        if wc >= wh {
            return Err(PhysicsError::invalid(
                "cold frequency",
                format!("{wc} rad/s"),
                format!("below the hot frequency ({wh} rad/s)"),
            ));
        }
        require_non_negative("hot contact time", self.hot_time)?;
        require_non_negative("cold contact time", self.cold_time)?;
        Ok(())
    }

    /// Total cycle time, s.
    pub fn cycle_time(&self) -> f64 {
        self.hot_time + self.expansion.duration() + self.cold_time + self.compression.duration()
    }

    /// The four stroke maps.
    pub fn maps(&self, opts: &PropagationOptions) -> Result<CycleMaps> {
        self.validate()?;
        let (wh, wc) = (self.hot.omega(), self.cold.omega());
        Ok(CycleMaps {
            hot: self.hot.stroke(self.hot_time, &self.noise)?,
            expansion: AffineMap::linear(self.expansion.energy_map("expansion", wh, wc, &self.noise, opts)?),
            cold: self.cold.stroke(self.cold_time, &self.noise)?,
            compression: AffineMap::linear(self.compression.energy_map("compression", wc, wh, &self.noise, opts)?),
        })
    }

    /// Stability, limit cycle and its figures.
    pub fn analyse(&self, opts: &PropagationOptions) -> Result<CycleReport> {
        let maps = self.maps(opts)?;
        let (wh, wc) = (self.hot.omega(), self.cold.omega());
        let whole = maps.composed();
        let rho = whole.spectral_radius();
        let mut report = CycleReport {
            stable: rho < 1.0 - STABILITY_MARGIN,
            spectral_radius: rho,
            otto_efficiency: 1.0 - wc / wh,
            cycle_time_s: self.cycle_time(),
            figures: None,
        };
        if !report.stable {
            return Ok(report);
        }
        let Some(v0) = whole.fixed_point() else {
            report.stable = false;
            return Ok(report);
        };
        let v1 = maps.hot.apply(&v0);
        let v2 = maps.expansion.apply(&v1);
        let v3 = maps.cold.apply(&v2);
        let qh = HBAR * wh;
        let heat_hot = (v1[0] - v0[0]) / qh;
        let heat_cold = (v3[0] - v2[0]) / qh;
        let work_out = heat_hot + heat_cold;
        let regime = if work_out > 0.0 {
            Regime::Engine
        } else if heat_cold > 0.0 {
            Regime::Refrigerator
        } else if heat_hot < 0.0 {
            Regime::Heater
        } else {
            Regime::Accelerator
        };
        let corner = |i: usize, v: &Vector3<f64>, w: f64| Corner {
            label: CORNER_LABELS[i],
            omega_rad_s: w,
            energy_quanta: v[0] / (HBAR * w),
            l_quanta: v[1] / (HBAR * w),
            c_quanta: v[2] / (HBAR * w),
        };
        let again = whole.apply(&v0);
        let residual = (again - v0).amax() / qh;
        let t = self.cycle_time();
        report.figures = Some(CycleFigures {
            regime,
            work_out_quanta: work_out,
            heat_hot_quanta: heat_hot,
            heat_cold_quanta: heat_cold,
            efficiency: (regime == Regime::Engine && heat_hot > 0.0).then(|| work_out / heat_hot),
            cop: (regime == Regime::Refrigerator).then(|| heat_cold / (-work_out)),
            power_w: if t > 0.0 { work_out * qh / t } else { f64::INFINITY },
            corners: [corner(0, &v0, wh), corner(1, &v1, wh), corner(2, &v2, wc), corner(3, &v3, wc)],
            residual,
            fixed_point: v0,
        });
        Ok(report)
    }

    /// Plain iteration of whole cycles from a start (H, L, C) at omega_h, J; returns the
    /// state at the start of the hot stroke after each cycle.
    pub fn iterate(&self, start: Vector3<f64>, cycles: usize, opts: &PropagationOptions) -> Result<Vec<Vector3<f64>>> {
        let whole = self.maps(opts)?.composed();
        let mut v = start;
        Ok((0..cycles)
            .map(|_| {
                v = whole.apply(&v);
                v
            })
            .collect())
    }
}
