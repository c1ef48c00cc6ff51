//! The one colour map of every heat map, app and files alike: "tide", dark ink through
//! sea green and sand to paper, with lightness rising steadily (readable in grey and by
//! colour-blind readers), and the contour colour drawn over it.

/// Stops of the "tide" colour ramp, low to high (sRGB).
const TIDE: [[f32; 3]; 5] =
    [[14.0, 24.0, 40.0], [24.0, 82.0, 100.0], [70.0, 146.0, 120.0], [200.0, 190.0, 118.0], [248.0, 242.0, 226.0]];

/// Colour of contour lines over the map (sRGB).
pub const CONTOUR: [u8; 3] = [236, 96, 32];

/// Colour of a cell without a value (sRGB): mid grey.
pub const NO_VALUE: [u8; 3] = [128, 128, 128];

/// The colour of t in [0, 1] (clamped; NaN gives [`NO_VALUE`]).
pub fn tide(t: f64) -> [u8; 3] {
    if t.is_nan() {
        return NO_VALUE;
    }
    let x = t.clamp(0.0, 1.0) as f32 * (TIDE.len() - 1) as f32;
    let k = (x.floor() as usize).min(TIDE.len() - 2);
    let f = x - k as f32;
    let c = |i: usize| (TIDE[k][i] + (TIDE[k + 1][i] - TIDE[k][i]) * f) as u8;
    [c(0), c(1), c(2)]
}

#[cfg(test)]
mod tests {
    use super::tide;

    /// Relative luminance rises along the map (sRGB to linear, ITU-R BT.709 weights):
    /// the order of values survives grey printing.
    #[test]
    fn lightness_rises_monotonically() {
        let lum = |[r, g, b]: [u8; 3]| {
            let lin = |c: u8| {
                let c = f64::from(c) / 255.0;
                if c <= 0.04045 { c / 12.92 } else { ((c + 0.055) / 1.055).powf(2.4) }
            };
            0.2126 * lin(r) + 0.7152 * lin(g) + 0.0722 * lin(b)
        };
        let l: Vec<f64> = (0..=100).map(|k| lum(tide(f64::from(k) / 100.0))).collect();
        assert!(l.windows(2).all(|w| w[1] >= w[0] - 1e-3), "{l:?}");
    }
}
