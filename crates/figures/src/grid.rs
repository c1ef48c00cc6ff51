//! A value over two axes, the one range rule of every heat map's colours, and its level
//! contours.

/// A value on a rectangular grid: `values[iy * xs.len() + ix]`, NaN where undefined.
#[derive(Debug, Clone, PartialEq)]
pub struct HeatGrid {
    /// Column coordinates (increasing), plot units.
    pub xs: Vec<f64>,
    /// Row coordinates (increasing), plot units.
    pub ys: Vec<f64>,
    /// Values, row by row (y outer).
    pub values: Vec<f64>,
}

impl HeatGrid {
    /// The value at column `ix`, row `iy` (NaN outside the grid).
    pub fn at(&self, ix: usize, iy: usize) -> f64 {
        self.values.get(iy * self.xs.len() + ix).copied().unwrap_or(f64::NAN)
    }

    /// The finite range of the values, if any.
    pub fn range(&self) -> Option<(f64, f64)> {
        let finite = self.values.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((f64::INFINITY, f64::NEG_INFINITY), |(a, b), v| (a.min(v), b.max(v)));
        (lo <= hi).then_some((lo, hi))
    }

    /// The colour range: the finite range widened to at least one decade, or
    /// (-16, 0) when nothing is finite.
    pub fn colour_range(&self) -> (f64, f64) {
        self.range().map_or((-16.0, 0.0), |(lo, hi)| if hi > lo { (lo, hi) } else { (lo - 1.0, hi + 1.0) })
    }

    /// Width and height of one cell, plot units.
    pub fn cell(&self) -> (f64, f64) {
        let step = |v: &[f64]| if v.len() > 1 { (v[v.len() - 1] - v[0]) / (v.len() - 1) as f64 } else { 1.0 };
        (step(&self.xs), step(&self.ys))
    }
}

/// Line segments of the contour `value = level` (marching squares with linear
/// interpolation along cell edges; cells with an undefined corner are skipped).
pub fn contour(grid: &HeatGrid, level: f64) -> Vec<[[f64; 2]; 2]> {
    let mut out = Vec::new();
    let (nx, ny) = (grid.xs.len(), grid.ys.len());
    if nx < 2 || ny < 2 || !level.is_finite() {
        return out;
    }
    for iy in 0..ny - 1 {
        for ix in 0..nx - 1 {
            // Corners counter-clockwise from bottom-left.
            let corners = [(ix, iy), (ix + 1, iy), (ix + 1, iy + 1), (ix, iy + 1)];
            let v = corners.map(|(x, y)| grid.at(x, y));
            if v.iter().any(|x| !x.is_finite()) {
                continue;
            }
            let p = corners.map(|(x, y)| [grid.xs[x], grid.ys[y]]);
            let mut crossings: Vec<[f64; 2]> = Vec::with_capacity(4);
            for e in 0..4 {
                let (a, b) = (e, (e + 1) % 4);
                if (v[a] < level) != (v[b] < level) {
                    let f = (level - v[a]) / (v[b] - v[a]);
                    crossings.push([p[a][0] + f * (p[b][0] - p[a][0]), p[a][1] + f * (p[b][1] - p[a][1])]);
                }
            }
            match crossings.len() {
                2 => out.push([crossings[0], crossings[1]]),
                4 => {
                    // A saddle: the mean of the corners decides which pairs join.
                    let centre_below = v.iter().sum::<f64>() / 4.0 < level;
                    let below0 = v[0] < level;
                    if centre_below == below0 {
                        out.push([crossings[0], crossings[3]]);
                        out.push([crossings[1], crossings[2]]);
                    } else {
                        out.push([crossings[0], crossings[1]]);
                        out.push([crossings[2], crossings[3]]);
                    }
                }
                _ => {}
            }
        }
    }
    out
}
