//! The power of an Otto cycle's limit cycle over two of its stroke times: the hot and
//! cold contact times and the durations of the two work strokes (a ramp is stretched
//! in time, keeping its shape; a sudden stroke's hold and an ideal stroke's time are
//! set). Cells run in parallel with progress and cancel; a cell that has no figure
//! says why (unstable, or the stroke cannot be built at that time).

use crate::cycle::{OttoCycle, WorkStroke};
use crate::error::{PhysicsError, Result};
use crate::propagate::PropagationOptions;
use crate::ramp::RampShape;
use rayon::prelude::*;
use std::sync::atomic::{AtomicBool, AtomicUsize, Ordering};

/// A stroke time a power map can vary.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum StrokeTime {
    /// Contact time with the hot bath.
    HotContact,
    /// Contact time with the cold bath.
    ColdContact,
    /// Duration of the expansion stroke.
    Expansion,
    /// Duration of the compression stroke.
    Compression,
}

impl StrokeTime {
    /// All four.
    pub const ALL: [Self; 4] = [Self::HotContact, Self::ColdContact, Self::Expansion, Self::Compression];

    /// Words for labels.
    pub fn label(self) -> &'static str {
        match self {
            Self::HotContact => "hot contact time",
            Self::ColdContact => "cold contact time",
            Self::Expansion => "expansion time",
            Self::Compression => "compression time",
        }
    }
}

fn stroke_with_time(stroke: &WorkStroke, t: f64) -> Result<WorkStroke> {
    Ok(match stroke {
        WorkStroke::Ramp(r) => WorkStroke::Ramp(r.with_duration(t)?),
        WorkStroke::Sudden { .. } => WorkStroke::Sudden { hold: t },
        WorkStroke::IdealAdiabatic { .. } => WorkStroke::IdealAdiabatic { time: t },
    })
}

/// The cycle with one stroke time set, s (>= 0; a ramp needs > 0).
pub fn with_stroke_time(cycle: &OttoCycle, which: StrokeTime, t: f64) -> Result<OttoCycle> {
    if !(t.is_finite() && t >= 0.0) {
        return Err(PhysicsError::invalid(which.label(), format!("{t:e} s"), "a finite time >= 0"));
    }
    let mut c = cycle.clone();
    match which {
        StrokeTime::HotContact => c.hot_time = t,
        StrokeTime::ColdContact => c.cold_time = t,
        StrokeTime::Expansion => c.expansion = stroke_with_time(&c.expansion, t)?,
        StrokeTime::Compression => c.compression = stroke_with_time(&c.compression, t)?,
    }
    Ok(c)
}

/// The time of a stroke in the cycle, s.
pub fn stroke_time(cycle: &OttoCycle, which: StrokeTime) -> f64 {
    let of = |s: &WorkStroke| match s {
        WorkStroke::Ramp(r) => r.duration(),
        WorkStroke::Sudden { hold } => *hold,
        WorkStroke::IdealAdiabatic { time } => *time,
    };
    match which {
        StrokeTime::HotContact => cycle.hot_time,
        StrokeTime::ColdContact => cycle.cold_time,
        StrokeTime::Expansion => of(&cycle.expansion),
        StrokeTime::Compression => of(&cycle.compression),
    }
}

/// Power of the limit cycle over a grid of two stroke times.
#[derive(Debug, Clone, PartialEq)]
pub struct PowerMap {
    /// Horizontal axis.
    pub x_axis: StrokeTime,
    /// Vertical axis.
    pub y_axis: StrokeTime,
    /// Times along x, s.
    pub xs: Vec<f64>,
    /// Times along y, s.
    pub ys: Vec<f64>,
    /// Power delivered by the oscillator, W, row by row (y outer); for a cell without
    /// one, why (the cycle is unstable, or a stroke cannot be built at those times).
    pub power_w: Vec<std::result::Result<f64, String>>,
}

impl PowerMap {
    /// Power of cell (ix, iy), W, where there is one.
    pub fn power(&self, ix: usize, iy: usize) -> Option<f64> {
        self.power_w.get(iy * self.xs.len() + ix).and_then(|p| p.as_ref().ok().copied())
    }
}

fn cell(cycle: &OttoCycle, axes: (StrokeTime, StrokeTime), x: f64, y: f64, opts: &PropagationOptions) -> Result<f64> {
    let c = with_stroke_time(&with_stroke_time(cycle, axes.0, x)?, axes.1, y)?;
    let r = c.analyse(opts)?;
    match r.figures {
        Some(f) if f.power_w.is_finite() => Ok(f.power_w),
        Some(_) => Err(PhysicsError::invalid("power", "not finite", "a finite power")),
        None => Err(PhysicsError::invalid(
            "limit cycle",
            format!("spectral radius {:.6}", r.spectral_radius),
            "below 1: this cycle heats up cycle after cycle (no limit cycle)",
        )),
    }
}

/// The reason of a cell left out because the map was cancelled.
pub const NOT_COMPUTED: &str = "not computed: the map was cancelled";

/// Computes the power map of `cycle` over `xs` x `ys` of the two axes, in parallel.
/// `progress` gets the number of cells done; `cancel` stops the map early, keeping the
/// cells done so far (the others say [`NOT_COMPUTED`]).
pub fn power_map(
    cycle: &OttoCycle,
    axes: (StrokeTime, StrokeTime),
    xs: &[f64],
    ys: &[f64],
    opts: &PropagationOptions,
    progress: &(dyn Fn(usize) + Sync),
    cancel: &AtomicBool,
) -> Result<PowerMap> {
    if axes.0 == axes.1 {
        return Err(PhysicsError::invalid("power map axes", axes.0.label(), "two different stroke times"));
    }
    if xs.is_empty() || ys.is_empty() || xs.len() * ys.len() > 1_000_000 {
        return Err(PhysicsError::invalid("power map grid", format!("{} x {}", xs.len(), ys.len()), "1 to 10^6 cells"));
    }
    let done = AtomicUsize::new(0);
    let n = xs.len();
    let power_w: Vec<_> = (0..n * ys.len())
        .into_par_iter()
        .map(|k| {
            if cancel.load(Ordering::Relaxed) {
                return Err(NOT_COMPUTED.to_string());
            }
            let p = cell(cycle, axes, xs[k % n], ys[k / n], opts).map_err(|e| e.to_string());
            progress(done.fetch_add(1, Ordering::Relaxed) + 1);
            p
        })
        .collect();
    Ok(PowerMap { x_axis: axes.0, y_axis: axes.1, xs: xs.to_vec(), ys: ys.to_vec(), power_w })
}
