use super::RampShape;
use crate::error::{PhysicsError, Result};

/// Which quantity the table's value column holds.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SampledColumn {
    /// omega, rad/s (every row > 0).
    Omega,
    /// omega², (rad/s)² (rows may be <= 0 except the first and last).
    Omega2,
}

/// How the table is read between rows.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum SampledReading {
    /// Linear interpolation of the value column between rows.
    Linear,
    /// Left sample-and-hold: row k's value on [t_k, t_k+1); the last row is the end
    /// value (held for no time). What an unfiltered waveform generator plays.
    Hold,
}

/// A sampled table (an imported waveform). Times are shifted to start at 0.
#[derive(Debug, Clone, PartialEq)]
pub struct SampledRamp {
    times: Vec<f64>,
    values: Vec<f64>,
    column: SampledColumn,
    reading: SampledReading,
    omega2: Vec<f64>,
    uniform_step: Option<f64>,
    ends: Option<(f64, f64)>,
}

impl SampledRamp {
    /// Rows (t_k in s, value in rad/s or (rad/s)²): at least 2, times strictly increasing.
    /// Errors name the row (1-based) and the value.
    pub fn new(times: Vec<f64>, values: Vec<f64>, column: SampledColumn, reading: SampledReading) -> Result<Self> {
        Self::build(times, values, column, reading, false)
    }

    /// A table whose end frequencies (rad/s, > 0) are stated, so its first and last rows
    /// may hold any omega² (a played table can start on an inverted sample).
    pub fn with_stated_ends(
        times: Vec<f64>,
        values: Vec<f64>,
        column: SampledColumn,
        reading: SampledReading,
        omega_i: f64,
        omega_f: f64,
    ) -> Result<Self> {
        Self::build(times, values, column, reading, true)?.with_end_frequencies(omega_i, omega_f)
    }

    fn build(
        times: Vec<f64>,
        values: Vec<f64>,
        column: SampledColumn,
        reading: SampledReading,
        ends_stated: bool,
    ) -> Result<Self> {
        if times.len() != values.len() {
            return Err(PhysicsError::invalid(
                "number of values",
                values.len(),
                format!("equal to the number of times ({})", times.len()),
            ));
        }
        if times.len() < 2 {
            return Err(PhysicsError::invalid("number of rows", times.len(), "at least 2"));
        }
        for (k, (&t, &v)) in times.iter().zip(&values).enumerate() {
            let hi = crate::error::WORKING_RANGE.1;
            if !(t.is_finite() && t.abs() <= hi) {
                return Err(PhysicsError::invalid(format!("time in row {}", k + 1), t, format!("-{hi:e} to {hi:e} s")));
            }
            match column {
                SampledColumn::Omega if v.abs() > hi || !v.is_finite() => {
                    return Err(PhysicsError::invalid(
                        format!("value in row {}", k + 1),
                        v,
                        format!("at most {hi:e} rad/s"),
                    ));
                }
                SampledColumn::Omega2 => {
                    crate::error::require_omega2(&format!("value in row {}", k + 1), v)?;
                }
                SampledColumn::Omega => {}
            }
            if k > 0 && t <= times[k - 1] {
                return Err(PhysicsError::invalid(
                    format!("time in row {}", k + 1),
                    t,
                    format!("greater than the time in row {} ({})", k, times[k - 1]),
                ));
            }
            let end_row = !ends_stated && (k == 0 || k == times.len() - 1);
            if v <= 0.0 && (column == SampledColumn::Omega || end_row) {
                let what = if column == SampledColumn::Omega { "omega" } else { "omega²" };
                let why = if column == SampledColumn::Omega {
                    "> 0 (an omega column cannot describe an inverted trap; use an omega² column)"
                } else {
                    "> 0 in the first and last rows (the trap must confine at both ends)"
                };
                return Err(PhysicsError::invalid(format!("{what} in row {}", k + 1), v, why));
            }
        }
        let t0 = times[0];
        let mut times = times;
        for t in &mut times {
            *t -= t0;
        }
        if let Some(k) = (1..times.len()).find(|&k| times[k] <= times[k - 1]) {
            return Err(PhysicsError::invalid(
                format!("time in row {}", k + 1),
                times[k] + t0,
                "far enough from the row before that they differ once the table starts at t = 0",
            ));
        }
        let omega2: Vec<f64> = match column {
            SampledColumn::Omega => values.iter().map(|w| w * w).collect(),
            SampledColumn::Omega2 => values.clone(),
        };
        let dt0 = times[1] - times[0];
        let uniform = times.windows(2).all(|w| ((w[1] - w[0]) - dt0).abs() <= 1e-9 * dt0);
        let uniform_step = uniform.then(|| times[times.len() - 1] / (times.len() - 1) as f64);
        Ok(Self { times, values, column, reading, omega2, uniform_step, ends: None })
    }

    /// The same table with the trap frequencies before and after it stated explicitly
    /// (rad/s, > 0). Without them the first and last rows are taken as the end
    /// frequencies; a generator's table whose first row is already a played sample (a
    /// midpoint sample, the first hold of a bang-bang ramp) needs them for Q*.
    pub fn with_end_frequencies(mut self, omega_i: f64, omega_f: f64) -> Result<Self> {
        let omega_i = crate::error::require_positive("initial frequency", omega_i)?;
        let omega_f = crate::error::require_positive("final frequency", omega_f)?;
        self.ends = Some((omega_i, omega_f));
        Ok(self)
    }

    /// Explicit end frequencies, rad/s, if set.
    pub fn end_frequencies(&self) -> Option<(f64, f64)> {
        self.ends
    }

    /// Row times, s (first is 0).
    pub fn times(&self) -> &[f64] {
        &self.times
    }
    /// Row values as given (rad/s or (rad/s)²).
    pub fn values(&self) -> &[f64] {
        &self.values
    }
    /// omega² of every row, (rad/s)².
    pub fn omega2_rows(&self) -> &[f64] {
        &self.omega2
    }
    /// Value column kind.
    pub fn column(&self) -> SampledColumn {
        self.column
    }
    /// Reading between rows.
    pub fn reading(&self) -> SampledReading {
        self.reading
    }
    /// The same table read another way.
    #[must_use]
    pub fn with_reading(&self, reading: SampledReading) -> Self {
        Self { reading, ..self.clone() }
    }
    /// The common row spacing, s, when rows are uniform to 1e-9 relative.
    pub fn uniform_step(&self) -> Option<f64> {
        self.uniform_step
    }

    /// Row index k with t_k <= t < t_k+1 (clamped to the table). On a uniform table the
    /// row is computed from t and checked against its neighbours (O(1)); otherwise a
    /// binary search.
    #[inline]
    pub fn row_index(&self, t: f64) -> usize {
        let n = self.times.len();
        let Some(dt) = self.uniform_step else {
            return self.times.partition_point(|&x| x <= t).clamp(1, n - 1) - 1;
        };
        let guess = ((t - self.times[0]) / dt).floor();
        let mut k = if guess >= 0.0 { (guess as usize).min(n - 2) } else { 0 };
        while k > 0 && self.times[k] > t {
            k -= 1;
        }
        while k + 2 < n && self.times[k + 1] <= t {
            k += 1;
        }
        k
    }

    pub(crate) fn min_omega2(&self) -> (f64, f64) {
        self.extreme(|a, b| a < b)
    }

    pub(crate) fn max_omega2(&self) -> (f64, f64) {
        self.extreme(|a, b| a > b)
    }

    fn extreme(&self, better: impl Fn(f64, f64) -> bool) -> (f64, f64) {
        // Linear interpolation of omega or omega² keeps omega² between the rows'
        // values (omega > 0 in an omega column), so the rows hold the extremes.
        let mut best = (self.omega2[0], 0.0);
        for (k, &w2) in self.omega2.iter().enumerate() {
            if better(w2, best.0) {
                best = (w2, self.times[k]);
            }
        }
        best
    }
}

impl RampShape for SampledRamp {
    fn duration(&self) -> f64 {
        self.times[self.times.len() - 1]
    }
    fn omega_initial(&self) -> f64 {
        self.ends.map_or_else(|| self.omega2[0].sqrt(), |(wi, _)| wi)
    }
    fn omega_final(&self) -> f64 {
        self.ends.map_or_else(|| self.omega2[self.omega2.len() - 1].sqrt(), |(_, wf)| wf)
    }
    fn omega2(&self, t: f64) -> f64 {
        let n = self.times.len();
        if t >= self.times[n - 1] {
            return self.omega2[n - 1];
        }
        if t <= 0.0 {
            return self.omega2[0];
        }
        let k = self.row_index(t);
        match self.reading {
            SampledReading::Hold => self.omega2[k],
            SampledReading::Linear => {
                let s = (t - self.times[k]) / (self.times[k + 1] - self.times[k]);
                let v = self.values[k] + s * (self.values[k + 1] - self.values[k]);
                match self.column {
                    SampledColumn::Omega => v * v,
                    SampledColumn::Omega2 => v,
                }
            }
        }
    }
    fn omega2_rate(&self, t: f64) -> f64 {
        let n = self.times.len();
        if self.reading == SampledReading::Hold || t < 0.0 || t >= self.times[n - 1] {
            return 0.0;
        }
        let k = self.row_index(t);
        let h = self.times[k + 1] - self.times[k];
        let slope = (self.values[k + 1] - self.values[k]) / h;
        match self.column {
            SampledColumn::Omega => {
                let s = (t - self.times[k]) / h;
                2.0 * (self.values[k] + s * (self.values[k + 1] - self.values[k])) * slope
            }
            SampledColumn::Omega2 => slope,
        }
    }
    fn breakpoints(&self) -> Vec<f64> {
        self.times[1..self.times.len() - 1].to_vec()
    }
}
