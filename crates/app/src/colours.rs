//! Candidate colours: the project's own palette and the rule that gives a new
//! candidate a colour far from every colour in use.
//!
//! Distances are Euclidean in OKLab (B. Ottosson, "A perceptual color space for image
//! processing", 2020), where 0.1 is a clearly different colour. The palette was chosen
//! (by a farthest-point search over a grid of mid-lightness colours) so that every pair
//! stays at least 0.1 apart for normal vision and under the protanopia, deuteranopia
//! and tritanopia simulations of Machado, Oliveira and Fernandes (IEEE TVCG 15, 1291,
//! 2009), with a lightness between 0.52 and 0.76 so each reads on the light and the dark
//! theme alike.

/// The palette, in the order new candidates take it.
pub const PALETTE: [[u8; 3]; 8] = [
    [0, 136, 204],
    [238, 153, 34],
    [153, 85, 34],
    [0, 204, 187],
    [238, 0, 136],
    [119, 0, 255],
    [187, 153, 255],
    [187, 119, 34],
];

/// The colour for "passes" (energy-diagonal, target reached): egui's visuals have a warning
/// and an error colour but no pass colour, so this one follows the theme the same way.
pub fn pass(visuals: &egui::Visuals) -> egui::Color32 {
    if visuals.dark_mode { egui::Color32::from_rgb(110, 200, 130) } else { egui::Color32::from_rgb(25, 130, 60) }
}

/// The two stated-frequency bounds on the plots: the lowest in a cool, the highest in a
/// warm colour, both away from the candidate palette's hues where possible.
pub const LOWEST_BOUND: [u8; 3] = [70, 110, 150];
/// See [`LOWEST_BOUND`].
pub const HIGHEST_BOUND: [u8; 3] = [200, 60, 60];

/// The least OKLab distance a new colour keeps from every colour in use while one
/// that far can be found.
pub const MIN_DISTANCE: f64 = 0.1;

fn linear(c: u8) -> f64 {
    let c = f64::from(c) / 255.0;
    if c <= 0.040_45 { c / 12.92 } else { ((c + 0.055) / 1.055).powf(2.4) }
}

fn encoded(c: f64) -> u8 {
    let c = c.clamp(0.0, 1.0);
    let v = if c <= 0.003_130_8 { 12.92 * c } else { 1.055 * c.powf(1.0 / 2.4) - 0.055 };
    (v * 255.0).round() as u8
}

/// OKLab (L, a, b) of an sRGB colour (Ottosson 2020).
pub fn oklab(rgb: [u8; 3]) -> [f64; 3] {
    oklab_of_linear([linear(rgb[0]), linear(rgb[1]), linear(rgb[2])])
}

/// OKLab of a linear-light sRGB triple.
pub fn oklab_of_linear([r, g, b]: [f64; 3]) -> [f64; 3] {
    let l = 0.412_221_470_8 * r + 0.536_332_536_3 * g + 0.051_445_992_9 * b;
    let m = 0.211_903_498_2 * r + 0.680_699_545_1 * g + 0.107_396_956_6 * b;
    let s = 0.088_302_461_9 * r + 0.281_718_837_6 * g + 0.629_978_700_5 * b;
    let (l, m, s) = (l.cbrt(), m.cbrt(), s.cbrt());
    [
        0.210_454_255_3 * l + 0.793_617_785 * m - 0.004_072_046_8 * s,
        1.977_998_495_1 * l - 2.428_592_205 * m + 0.450_593_709_9 * s,
        0.025_904_037_1 * l + 0.782_771_766_2 * m - 0.808_675_766 * s,
    ]
}

/// The sRGB colour of an OKLab triple (clamped into the sRGB gamut).
pub fn from_oklab([lightness, a, b]: [f64; 3]) -> [u8; 3] {
    let l = (lightness + 0.396_337_777_4 * a + 0.215_803_757_3 * b).powi(3);
    let m = (lightness - 0.105_561_345_8 * a - 0.063_854_172_8 * b).powi(3);
    let s = (lightness - 0.089_484_177_5 * a - 1.291_485_548 * b).powi(3);
    [
        encoded(4.076_741_662_1 * l - 3.307_711_591_3 * m + 0.230_969_929_2 * s),
        encoded(-1.268_438_004_6 * l + 2.609_757_401_1 * m - 0.341_319_396_5 * s),
        encoded(-0.004_196_086_3 * l - 0.703_418_614_7 * m + 1.707_614_701 * s),
    ]
}

/// OKLab distance between two colours.
pub fn distance(x: [u8; 3], y: [u8; 3]) -> f64 {
    let (p, q) = (oklab(x), oklab(y));
    ((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2) + (p[2] - q[2]).powi(2)).sqrt()
}

fn nearest(c: [u8; 3], in_use: &[[u8; 3]]) -> f64 {
    in_use.iter().map(|&u| distance(c, u)).fold(f64::INFINITY, f64::min)
}

/// Extra colours past the palette: 72 hues at two lightnesses (0.62 and 0.72) and a
/// chroma of 0.13 in OKLCh.
fn generated() -> impl Iterator<Item = [u8; 3]> {
    [0.62, 0.72].into_iter().flat_map(|l| {
        (0..72).map(move |k| {
            let h = f64::from(k) * std::f64::consts::TAU / 72.0;
            from_oklab([l, 0.13 * h.cos(), 0.13 * h.sin()])
        })
    })
}

/// The colour for a new candidate. The rule: the first palette colour at least
/// [`MIN_DISTANCE`] from every colour in use (colours loaded from a file count too,
/// however close to the palette); when no palette colour is that far (more candidates
/// than the palette holds, or colours chosen by hand), the generated hue farthest from
/// every colour in use; once nothing is [`MIN_DISTANCE`] away (past a dozen or so
/// candidates), still the farthest one: candidates are then told apart by name in the
/// legend and the list.
pub fn next_colour(in_use: &[[u8; 3]]) -> [u8; 3] {
    if let Some(c) = PALETTE.iter().copied().find(|&c| nearest(c, in_use) >= MIN_DISTANCE) {
        return c;
    }
    PALETTE
        .iter()
        .copied()
        .chain(generated())
        .max_by(|&a, &b| nearest(a, in_use).total_cmp(&nearest(b, in_use)))
        .unwrap_or(PALETTE[0])
}

#[cfg(test)]
mod tests {
    use super::*;

    /// sRGB red is (0.62796, 0.22486, 0.12585) in OKLab and white (1, 0, 0)
    /// (Ottosson 2020, from memory).
    #[test]
    fn oklab_matches_the_published_values() {
        let red = oklab([255, 0, 0]);
        for (got, want) in red.iter().zip([0.627_955, 0.224_863, 0.125_846]) {
            assert!((got - want).abs() < 1e-4, "{red:?}");
        }
        let white = oklab([255, 255, 255]);
        assert!((white[0] - 1.0).abs() < 1e-4 && white[1].abs() < 1e-4 && white[2].abs() < 1e-4, "{white:?}");
        for c in PALETTE {
            assert_eq!(from_oklab(oklab(c)), c, "the inverse returns the colour");
        }
    }

    /// Protanopia, deuteranopia and tritanopia at full severity, on linear RGB
    /// (Machado, Oliveira and Fernandes, IEEE TVCG 15, 1291 (2009); matrices from memory).
    const DEFICIENCIES: [[[f64; 3]; 3]; 3] = [
        [[0.152_286, 1.052_583, -0.204_868], [0.114_503, 0.786_281, 0.099_216], [-0.003_882, -0.048_116, 1.051_998]],
        [[0.367_322, 0.860_646, -0.227_968], [0.280_085, 0.672_501, 0.047_413], [-0.011_820, 0.042_940, 0.968_881]],
        [[1.255_528, -0.076_749, -0.178_779], [-0.078_411, 0.930_809, 0.147_602], [0.004_733, 0.691_367, 0.303_900]],
    ];

    fn seen(m: &[[f64; 3]; 3], c: [u8; 3]) -> [f64; 3] {
        let v = [linear(c[0]), linear(c[1]), linear(c[2])];
        let w = m.map(|row| (row[0] * v[0] + row[1] * v[1] + row[2] * v[2]).clamp(0.0, 1.0));
        oklab_of_linear(w)
    }

    #[test]
    fn the_palette_is_distinct_for_common_colour_vision_deficiencies_and_reads_on_both_themes() {
        for (i, &x) in PALETTE.iter().enumerate() {
            let l = oklab(x)[0];
            assert!((0.52..=0.76).contains(&l), "{x:?}: lightness {l}");
            for &y in &PALETTE[i + 1..] {
                assert!(distance(x, y) >= MIN_DISTANCE, "{x:?} {y:?}");
                for m in &DEFICIENCIES {
                    let (p, q) = (seen(m, x), seen(m, y));
                    let d = ((p[0] - q[0]).powi(2) + (p[1] - q[1]).powi(2) + (p[2] - q[2]).powi(2)).sqrt();
                    assert!(d >= MIN_DISTANCE, "{x:?} and {y:?} merge under a deficiency: {d}");
                }
            }
        }
    }

    #[test]
    fn a_new_colour_keeps_its_distance_from_every_colour_in_use() {
        // A colour close to the first palette entry, as a file may bring.
        let mut in_use = vec![[31, 119, 180]];
        for k in 0..12 {
            let c = next_colour(&in_use);
            let d = nearest(c, &in_use);
            assert!(d >= MIN_DISTANCE, "candidate {k}: {c:?} only {d} from a colour in use");
            in_use.push(c);
        }
        assert_ne!(in_use[1], PALETTE[0], "the palette blue is too close to the loaded one");
        // Past what can be kept apart a colour is still given.
        for _ in 0..200 {
            let c = next_colour(&in_use);
            in_use.push(c);
        }
    }
}
