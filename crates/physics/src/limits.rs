//! What the hardware can play: frequency bounds and a slew limit, and the stretches of
//! a ramp that break them.

use crate::error::{PhysicsError, Result};
use crate::ramp::{Ramp, RampShape};

/// Stated limits of the apparatus. `None` means no limit of that kind.
#[derive(Debug, Clone, Copy, PartialEq, Default)]
pub struct TrapLimits {
    /// Lowest omega the trap may reach, rad/s (> 0). omega² <= 0 always breaks it.
    pub omega_min: Option<f64>,
    /// Highest omega, rad/s.
    pub omega_max: Option<f64>,
    /// Largest |d omega/dt|, rad/s per s (> 0). Jumps of held or piecewise-constant
    /// ramps break it (their slew is unbounded).
    pub slew_max: Option<f64>,
}

impl TrapLimits {
    /// Validated limits.
    pub fn new(omega_min: Option<f64>, omega_max: Option<f64>, slew_max: Option<f64>) -> Result<Self> {
        for (name, v) in [("lowest frequency", omega_min), ("highest frequency", omega_max), ("slew limit", slew_max)] {
            if let Some(v) = v
                && !(v.is_finite() && v > 0.0)
            {
                return Err(PhysicsError::invalid(name, v, "a finite number > 0"));
            }
        }
        if let (Some(lo), Some(hi)) = (omega_min, omega_max)
            && lo >= hi
        {
            return Err(PhysicsError::invalid("lowest frequency", lo, format!("below the highest frequency ({hi})")));
        }
        Ok(Self { omega_min, omega_max, slew_max })
    }
}

/// Which limit a stretch breaks.
#[derive(Debug, Clone, Copy, PartialEq, Eq, Hash)]
pub enum ViolationKind {
    /// omega² <= 0: the trap is flat or inverted (not a bound violation by itself
    /// unless a lowest frequency is stated, but always marked).
    Inverted,
    /// omega below the lowest frequency.
    BelowMinimum,
    /// omega above the highest frequency.
    AboveMaximum,
    /// |d omega/dt| above the slew limit.
    Slew,
}

impl ViolationKind {
    /// The JSON value: `inverted`, `below-lowest`, `above-highest`, `slew`.
    pub fn key(self) -> &'static str {
        match self {
            Self::Inverted => "inverted",
            Self::BelowMinimum => "below-lowest",
            Self::AboveMaximum => "above-highest",
            Self::Slew => "slew",
        }
    }
    /// Words for reports.
    pub fn describe(self) -> &'static str {
        match self {
            Self::Inverted => "omega² <= 0 (inverted or flat trap)",
            Self::BelowMinimum => "below the lowest frequency",
            Self::AboveMaximum => "above the highest frequency",
            Self::Slew => "faster than the slew limit",
        }
    }
}

/// A stretch [start, end] (s) of the ramp where a limit is broken.
#[derive(Debug, Clone, Copy, PartialEq)]
pub struct Violation {
    /// Which limit.
    pub kind: ViolationKind,
    /// Start of the stretch, s.
    pub start: f64,
    /// End of the stretch, s.
    pub end: f64,
    /// Worst value in the stretch: omega² ((rad/s)²) for Inverted, omega (rad/s) for the
    /// bounds, |d omega/dt| (rad/s²; infinite for a jump) for Slew.
    pub worst: f64,
}

impl Violation {
    /// The worst value in the units the limits are stated in: omega² in (rad/s)² for an
    /// inverted stretch, the frequency omega/(2 pi) in Hz for the bounds, |d omega/dt|/(2 pi)
    /// in Hz/s for the slew; `None` for a jump (unbounded slew).
    pub fn worst_as_stated(&self) -> Option<(f64, &'static str)> {
        if !self.worst.is_finite() {
            return None;
        }
        let two_pi = std::f64::consts::TAU;
        Some(match self.kind {
            ViolationKind::Inverted => (self.worst, "(rad/s)^2"),
            ViolationKind::BelowMinimum | ViolationKind::AboveMaximum => (self.worst / two_pi, "Hz"),
            ViolationKind::Slew => (self.worst / two_pi, "Hz/s"),
        })
    }
}

#[cfg(feature = "serde")]
impl serde::Serialize for Violation {
    /// `kind` (`inverted`, `below-lowest`, `above-highest`, `slew`), `what` in words,
    /// `start_s`, `end_s`, `worst` in the units the limits are stated in and
    /// `worst_unit` (`(rad/s)^2`, `Hz`, `Hz/s`), both null for a jump.
    fn serialize<S: serde::Serializer>(&self, s: S) -> std::result::Result<S::Ok, S::Error> {
        use serde::ser::SerializeStruct;
        let mut st = s.serialize_struct("Violation", 6)?;
        st.serialize_field("kind", self.kind.key())?;
        st.serialize_field("what", self.kind.describe())?;
        st.serialize_field("start_s", &self.start)?;
        st.serialize_field("end_s", &self.end)?;
        let worst = self.worst_as_stated();
        st.serialize_field("worst", &worst.map(|w| w.0))?;
        st.serialize_field("worst_unit", &worst.map(|w| w.1))?;
        st.end()
    }
}

/// Finds the stretches where the ramp breaks `limits`, and where omega² <= 0, on the
/// sample `times` (sorted). Held and piecewise ramps are also checked row by row.
pub fn find_violations(ramp: &Ramp, limits: &TrapLimits, times: &[f64]) -> Vec<Violation> {
    let mut tracker = ViolationTracker::new(*limits);
    let jumps = ramp.is_piecewise_constant();
    let mut prev: Option<f64> = None;
    for &t in times {
        let w2 = ramp.omega2(t);
        let slew = if jumps {
            prev.and_then(|pw2| if (pw2 - w2).abs() > 0.0 { Some(f64::INFINITY) } else { None })
        } else {
            ramp.omega_rate(t).map(f64::abs)
        };
        tracker.observe(t, w2, slew);
        prev = Some(w2);
    }
    tracker.finish()
}

/// Follows a trap point by point and collects the stretches that break the limits (and
/// where omega² <= 0): what [`find_violations`] does over a ramp, for a trap that is
/// produced as a stream (a playback) and never stored.
#[derive(Debug, Clone)]
pub struct ViolationTracker {
    limits: TrapLimits,
    open: [Option<Violation>; 4],
    out: Vec<Violation>,
}

impl ViolationTracker {
    /// A tracker for these limits.
    pub fn new(limits: TrapLimits) -> Self {
        Self { limits, open: [None; 4], out: Vec::new() }
    }

    /// The trap at time `t` (increasing from call to call): omega² and, where known,
    /// |d omega/dt| (rad/s², infinite at a jump).
    #[inline]
    pub fn observe(&mut self, t: f64, w2: f64, slew: Option<f64>) {
        let w = (w2 > 0.0).then(|| w2.sqrt());
        let limits = &self.limits;
        let checks: [(ViolationKind, Option<f64>); 4] = [
            (ViolationKind::Inverted, (w2 <= 0.0).then_some(w2)),
            (
                ViolationKind::BelowMinimum,
                limits.omega_min.and_then(|lo| match w {
                    Some(w) if w < lo => Some(w),
                    None => Some(0.0),
                    _ => None,
                }),
            ),
            (ViolationKind::AboveMaximum, limits.omega_max.and_then(|hi| w.filter(|&w| w > hi))),
            (ViolationKind::Slew, limits.slew_max.and_then(|s| slew.filter(|&v| v > s))),
        ];
        for (i, (kind, bad)) in checks.into_iter().enumerate() {
            match (bad, self.open[i].as_mut()) {
                (Some(v), Some(o)) => {
                    o.end = t;
                    let worse = match kind {
                        ViolationKind::Inverted | ViolationKind::BelowMinimum => v < o.worst,
                        _ => v > o.worst,
                    };
                    if worse {
                        o.worst = v;
                    }
                }
                (Some(v), None) => self.open[i] = Some(Violation { kind, start: t, end: t, worst: v }),
                (None, Some(_)) => self.out.extend(self.open[i].take()),
                (None, None) => {}
            }
        }
    }

    /// The stretches found, by start time.
    pub fn finish(mut self) -> Vec<Violation> {
        self.out.extend(self.open.into_iter().flatten());
        self.out.sort_by(|a, b| a.start.total_cmp(&b.start));
        self.out
    }
}

/// How far a ramp breaks the limits, for optimisers: the relative excess of its
/// extreme frequencies over the bounds (refined extremes, see [`Ramp::min_omega2`]) plus
/// the sum over slew-breaking stretches, on `points` grid times, of the relative excess
/// of their worst point. 0 when the ramp keeps to the limits; omega² <= 0 counts only
/// against a stated lowest frequency.
pub fn limit_excess(ramp: &Ramp, limits: &TrapLimits, points: usize) -> f64 {
    let mut excess = 0.0;
    if let Some(lo) = limits.omega_min {
        let (w2, _) = ramp.min_omega2();
        let w = w2.max(0.0).sqrt();
        if w < lo {
            excess += (lo - w) / lo;
        }
    }
    if let Some(hi) = limits.omega_max {
        let (w2, _) = ramp.max_omega2();
        let w = w2.max(0.0).sqrt();
        if w > hi {
            excess += (w - hi) / hi;
        }
    }
    if let Some(s) = limits.slew_max {
        let only_slew = TrapLimits { omega_min: None, omega_max: None, slew_max: Some(s) };
        excess += find_violations(ramp, &only_slew, &ramp.grid_with_breakpoints(points))
            .iter()
            .filter(|v| v.kind == ViolationKind::Slew)
            .map(|v| ((v.worst - s) / s).min(1e6))
            .sum::<f64>();
    }
    excess
}
