//! The one number formatter of plots and tables: scientific notation where it reads
//! better (magnitudes below 1e-3 or from 1e4 or 1e5 up), trimmed digits otherwise.
//! File columns keep their own precision rules (they are not for reading).

/// A figure in a table or a verdict line: at most four decimals, or scientific with
/// four significant digits for magnitudes below 1e-3 or from 1e4 up, trailing zeros
/// trimmed ("0.001", "12.5", "2.5e-7"); "0" for zero.
pub fn sci(v: f64) -> String {
    if !v.is_finite() {
        return if v.is_nan() {
            "undefined".into()
        } else if v > 0.0 {
            "unbounded".into()
        } else {
            "-unbounded".into()
        };
    }
    if v == 0.0 {
        return "0".into();
    }
    let trim = |m: &str| {
        if m.contains('.') { m.trim_end_matches('0').trim_end_matches('.').to_string() } else { m.to_string() }
    };
    let a = v.abs();
    if (1e-3..1e4).contains(&a) {
        trim(&format!("{v:.4}"))
    } else {
        let s = format!("{v:.3e}");
        let (m, e) = s.split_once('e').unwrap_or((&s, "0"));
        format!("{}e{e}", trim(m))
    }
}

/// The decimals a tick label needs when plotters places up to `labels` ticks over `span`.
pub fn label_step(span: f64, labels: u32) -> f64 {
    if !(span.is_finite() && span > 0.0) {
        return 1.0;
    }
    10f64.powf((span / f64::from(labels.max(1))).log10().floor())
}

/// A plot tick's label: as many digits as the tick spacing needs and no more (no
/// "0.00000000000004"), scientific notation for magnitudes below 1e-3 or from 1e5 up.
pub fn tick_label(value: f64, step: f64) -> String {
    let step = step.abs();
    if !value.is_finite() || !step.is_finite() || step == 0.0 {
        return sci(value);
    }
    // A mark within rounding of zero is zero.
    if value.abs() < 1e-9 * step {
        return "0".into();
    }
    let magnitude = value.abs().max(step);
    if (1e-3..1e5).contains(&magnitude) {
        let decimals = (-step.log10().floor()).clamp(0.0, 12.0) as usize;
        format!("{value:.decimals$}")
    } else {
        let digits = (magnitude.log10().floor() - step.log10().floor()).clamp(0.0, 6.0) as usize;
        format!("{value:.digits$e}")
    }
}

/// A 1-2-5 tick step giving four to six ticks over `span` (> 0).
pub fn tick_step(span: f64) -> f64 {
    if !(span.is_finite() && span > 0.0) {
        return 1.0;
    }
    let decade = 10f64.powf((span / 4.0).log10().floor());
    [1.0, 2.0, 5.0, 10.0].into_iter().map(|m| m * decade).find(|s| span / s <= 6.0).unwrap_or(10.0 * decade)
}

/// The ticks of [`tick_step`] inside [lo, hi].
pub fn ticks(lo: f64, hi: f64) -> Vec<f64> {
    let step = tick_step(hi - lo);
    let (first, last) = ((lo / step).ceil() as i64, (hi / step).floor() as i64);
    (first..=last.min(first + 100)).map(|k| k as f64 * step).collect()
}

#[cfg(test)]
mod tests {
    use super::*;

    /// Tick labels carry the digits their spacing resolves (common practice, no source).
    #[test]
    fn tick_labels_are_trimmed_to_their_spacing() {
        assert_eq!(tick_label(4e-14, 1e-14), "4e-14");
        assert_eq!(tick_label(1.5e-7, 5e-8), "1.5e-7");
        assert_eq!(tick_label(250.0, 50.0), "250");
        assert_eq!(tick_label(0.25, 0.05), "0.25");
        assert_eq!(tick_label(1e-17, 0.1), "0");
        assert_eq!(tick_label(120_000.0, 20_000.0), "1.2e5");
        assert_eq!(tick_label(-3.0, 0.5), "-3.0");
    }

    #[test]
    fn ticks_are_four_to_six_on_a_one_two_five_step() {
        for (lo, hi) in [(0.0, 1.0), (-3.0, 7.0), (1e-9, 5e-7), (0.0, 536.0), (120e3, 130e3)] {
            let t = ticks(lo, hi);
            assert!((3..=7).contains(&t.len()), "{lo}..{hi}: {t:?}");
            assert!(t.iter().all(|v| (lo - 1e-12 * hi.abs()..=hi + 1e-12 * hi.abs()).contains(v)));
        }
        assert_eq!(sci(0.0), "0");
        assert_eq!(sci(2.5e-7), "2.5e-7");
        assert_eq!(sci(1.234_56e-9), "1.235e-9");
        assert_eq!(sci(12.5), "12.5");
        assert_eq!(sci(1e-3), "0.001");
    }
}
