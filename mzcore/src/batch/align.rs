//! Matching compounds across files: clustering by mass and retention time with at most one
//! compound per file in a row, and the retention-time drift fit between injections.
//!
//! The clustering is deterministic: candidates are visited in one total order (area, then
//! mass, retention time, file position, compound position), never in the order files came in.

use std::collections::HashMap;

use serde::{Deserialize, Serialize};

/// A mass tolerance: relative at high resolution, absolute at unit resolution.
#[derive(Debug, Clone, Copy, PartialEq, Serialize, Deserialize)]
pub enum MassTolerance {
    /// Parts per million of the mass.
    Ppm(f64),
    /// Absolute, u.
    Da(f64),
}

impl MassTolerance {
    /// Half-width of the window at `mass`, u.
    pub fn width(self, mass: f64) -> f64 {
        match self {
            MassTolerance::Ppm(p) => mass.abs() * p * 1e-6,
            MassTolerance::Da(d) => d,
        }
    }

    /// A bucket number such that masses within the tolerance fall in the same or an
    /// adjacent bucket.
    fn bucket(self, mass: f64) -> i64 {
        match self {
            MassTolerance::Ppm(p) => (mass.max(1e-9).ln() / (p * 1e-6)).floor() as i64,
            MassTolerance::Da(d) => (mass / d).floor() as i64,
        }
    }
}

/// One compound of one file, as the clustering sees it.
#[derive(Debug, Clone, Copy, PartialEq)]
pub(crate) struct Item {
    /// Position of the file (in acquisition order).
    pub file: usize,
    /// Position of the compound in its file's list.
    pub compound: usize,
    /// Mass matched on (neutral mass, or ion m/z when the neutral is unknown).
    pub mass: f64,
    /// Retention time (drift-corrected when known), minutes.
    pub rt: f64,
    /// Area, to visit strong compounds first.
    pub area: f64,
}

struct Row {
    mass: f64,
    rt: f64,
    members: Vec<usize>,
    /// Bit set of the files of the members.
    files: Vec<u64>,
}

impl Row {
    fn new(mass: f64, rt: f64) -> Row {
        Row { mass, rt, members: Vec::new(), files: Vec::new() }
    }

    fn has_file(&self, file: usize) -> bool {
        self.files.get(file / 64).is_some_and(|w| w & (1 << (file % 64)) != 0)
    }

    fn add(&mut self, i: usize, file: usize) {
        if self.files.len() <= file / 64 {
            self.files.resize(file / 64 + 1, 0);
        }
        self.files[file / 64] |= 1 << (file % 64);
        self.members.push(i);
    }

    fn clear(&mut self) {
        self.members.clear();
        self.files.iter_mut().for_each(|w| *w = 0);
    }
}

fn median(v: &mut [f64]) -> f64 {
    v.sort_by(f64::total_cmp);
    let n = v.len();
    if n == 0 {
        f64::NAN
    } else if n % 2 == 1 {
        v[n / 2]
    } else {
        0.5 * (v[n / 2 - 1] + v[n / 2])
    }
}

/// The median of `v` (NaN when empty); `v` is reordered.
pub(crate) fn median_of(v: &mut [f64]) -> f64 {
    median(v)
}

struct Index {
    tol: MassTolerance,
    buckets: HashMap<i64, Vec<usize>>,
}

impl Index {
    fn new(tol: MassTolerance, rows: &[Row]) -> Index {
        let mut idx = Index { tol, buckets: HashMap::new() };
        for (r, row) in rows.iter().enumerate() {
            idx.add(r, row.mass);
        }
        idx
    }

    fn add(&mut self, r: usize, mass: f64) {
        self.buckets.entry(self.tol.bucket(mass)).or_default().push(r);
    }

    /// Rows within tolerance of `item`, with their normalised distance.
    fn near<'a>(
        &'a self,
        rows: &'a [Row],
        item: &'a Item,
        rt_tol: f64,
    ) -> impl Iterator<Item = (f64, usize)> + 'a {
        let b = self.tol.bucket(item.mass);
        let width = self.tol.width(item.mass).max(1e-12);
        (b - 1..=b + 1).flat_map(move |k| {
            self.buckets.get(&k).into_iter().flatten().filter_map(move |&r| {
                let row = &rows[r];
                let dm = (row.mass - item.mass).abs();
                let dt = (row.rt - item.rt).abs();
                (dm <= width && dt <= rt_tol)
                    .then(|| (dm / width).powi(2) + (dt / rt_tol.max(1e-12)).powi(2))
                    .map(|d| (d, r))
            })
        })
    }
}

/// Puts the items of `order` into the nearest row within tolerance that has no member of
/// their file yet, or into a new row centred on them.
fn seed(order: &[usize], items: &[Item], rows: &mut Vec<Row>, index: &mut Index, rt_tol: f64) {
    for &i in order {
        let it = &items[i];
        let best = index
            .near(rows, it, rt_tol)
            .filter(|&(_, r)| !rows[r].has_file(it.file))
            .min_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)));
        match best {
            Some((_, r)) => rows[r].add(i, it.file),
            None => {
                index.add(rows.len(), it.mass);
                let mut row = Row::new(it.mass, it.rt);
                row.add(i, it.file);
                rows.push(row);
            }
        }
    }
}

/// Clusters items into rows (each a list of item positions, at most one per file): seeded
/// strongest first, then refined by reassigning every item to the nearest row centre (the
/// median mass and retention time of its members), closest pairs first. Rows come out
/// ordered by retention time, then mass.
pub(crate) fn cluster(items: &[Item], tol: MassTolerance, rt_tol: f64) -> Vec<Vec<usize>> {
    let mut order: Vec<usize> = (0..items.len()).collect();
    order.sort_by(|&a, &b| {
        let (x, y) = (&items[a], &items[b]);
        y.area
            .total_cmp(&x.area)
            .then(x.mass.total_cmp(&y.mass))
            .then(x.rt.total_cmp(&y.rt))
            .then(x.file.cmp(&y.file))
            .then(x.compound.cmp(&y.compound))
    });
    let mut rank = vec![0; items.len()];
    for (k, &i) in order.iter().enumerate() {
        rank[i] = k;
    }
    let mut rows: Vec<Row> = Vec::new();
    let mut index = Index::new(tol, &rows);
    seed(&order, items, &mut rows, &mut index, rt_tol);
    let mut previous: Vec<usize> = Vec::new();
    for _round in 0..4 {
        for row in rows.iter_mut() {
            let mut m: Vec<f64> = row.members.iter().map(|&i| items[i].mass).collect();
            let mut t: Vec<f64> = row.members.iter().map(|&i| items[i].rt).collect();
            row.mass = median(&mut m);
            row.rt = median(&mut t);
            row.clear();
        }
        let mut index = Index::new(tol, &rows);
        let mut pairs: Vec<(f64, usize, usize)> = Vec::new();
        for (i, it) in items.iter().enumerate() {
            pairs.extend(index.near(&rows, it, rt_tol).map(|(d, r)| (d, rank[i], r)));
        }
        pairs.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.cmp(&b.1)).then(a.2.cmp(&b.2)));
        let mut placed = vec![usize::MAX; items.len()];
        for (_, k, r) in pairs {
            let i = order[k];
            if placed[i] == usize::MAX && !rows[r].has_file(items[i].file) {
                rows[r].add(i, items[i].file);
                placed[i] = r;
            }
        }
        let left: Vec<usize> = order.iter().copied().filter(|&i| placed[i] == usize::MAX).collect();
        seed(&left, items, &mut rows, &mut index, rt_tol);
        rows.retain(|r| !r.members.is_empty());
        let mut signature: Vec<usize> = vec![usize::MAX; items.len()];
        for (r, row) in rows.iter().enumerate() {
            for &m in &row.members {
                signature[m] = r;
            }
        }
        if signature == previous {
            break;
        }
        previous = signature;
    }
    for row in rows.iter_mut() {
        row.members.sort_by_key(|&i| (items[i].file, items[i].compound));
        let mut m: Vec<f64> = row.members.iter().map(|&i| items[i].mass).collect();
        let mut t: Vec<f64> = row.members.iter().map(|&i| items[i].rt).collect();
        row.mass = median(&mut m);
        row.rt = median(&mut t);
    }
    rows.sort_by(|a, b| {
        a.rt.total_cmp(&b.rt).then(a.mass.total_cmp(&b.mass)).then(a.members.cmp(&b.members))
    });
    rows.into_iter().map(|r| r.members).collect()
}

/// A monotone map from one file's retention times to the batch's reference times, fitted
/// on the compounds found in most files (isotonic regression by pool-adjacent-violators,
/// linear between the fitted points and beyond them along the end-to-end slope).
#[derive(Debug, Clone, PartialEq, Serialize)]
pub struct DriftFit {
    /// Fitted points (file time, reference time), ascending in both.
    pub knots: Vec<(f64, f64)>,
    /// Compounds the fit was made from.
    pub anchors: usize,
    /// Median of reference minus file time over the anchors, minutes.
    pub median_shift_min: f64,
    /// Median absolute residual of the anchors after correction, minutes.
    pub median_abs_residual_min: f64,
    /// Largest absolute residual of the anchors after correction, minutes.
    pub max_abs_residual_min: f64,
}

impl DriftFit {
    /// No correction.
    pub fn identity() -> DriftFit {
        DriftFit {
            knots: Vec::new(),
            anchors: 0,
            median_shift_min: 0.0,
            median_abs_residual_min: 0.0,
            max_abs_residual_min: 0.0,
        }
    }

    /// Fits `points` (file time, reference time).
    ///
    /// # Examples
    ///
    /// ```
    /// use mzcore::batch::DriftFit;
    /// // This file runs 0.1 min late at the start and 0.2 min late at the end.
    /// let pts: Vec<(f64, f64)> = (0..10).map(|i| {
    ///     let t = 2.0 + i as f64 * 0.5;
    ///     (t + 0.1 + 0.1 * i as f64 / 9.0, t)
    /// }).collect();
    /// let fit = DriftFit::fit(&pts);
    /// let ((x3, y3), (x4, y4)) = (pts[3], pts[4]);
    /// assert!((fit.apply(x4) - y4).abs() < 1e-9);
    /// assert!((fit.apply(0.5 * (x3 + x4)) - 0.5 * (y3 + y4)).abs() < 1e-9);
    /// assert!(fit.max_abs_residual_min < 1e-9);
    /// assert!((fit.invert(fit.apply(3.3)) - 3.3).abs() < 1e-9);
    /// ```
    pub fn fit(points: &[(f64, f64)]) -> DriftFit {
        let mut p: Vec<(f64, f64)> =
            points.iter().copied().filter(|(x, y)| x.is_finite() && y.is_finite()).collect();
        if p.is_empty() {
            return DriftFit::identity();
        }
        p.sort_by(|a, b| a.0.total_cmp(&b.0).then(a.1.total_cmp(&b.1)));
        // Pool adjacent violators: blocks of (sum x, sum y, n) with non-decreasing means.
        let mut blocks: Vec<(f64, f64, f64)> = Vec::new();
        for &(x, y) in &p {
            blocks.push((x, y, 1.0));
            while blocks.len() > 1 {
                let (b, a) = (blocks[blocks.len() - 1], blocks[blocks.len() - 2]);
                if a.1 / a.2 > b.1 / b.2 {
                    blocks.pop();
                    let last = blocks.last_mut().expect("two blocks");
                    *last = (a.0 + b.0, a.1 + b.1, a.2 + b.2);
                } else {
                    break;
                }
            }
        }
        let mut knots: Vec<(f64, f64)> = Vec::new();
        for (sx, sy, n) in blocks {
            let k = (sx / n, sy / n);
            match knots.last_mut() {
                // Same file time, a later block: keep the later (higher) reference time.
                Some(last) if k.0 <= last.0 => last.1 = k.1.max(last.1),
                _ => knots.push(k),
            }
        }
        let mut fit = DriftFit { knots, anchors: p.len(), ..DriftFit::identity() };
        let mut shifts: Vec<f64> = p.iter().map(|(x, y)| y - x).collect();
        fit.median_shift_min = median(&mut shifts);
        let mut res: Vec<f64> = p.iter().map(|&(x, y)| (y - fit.apply(x)).abs()).collect();
        fit.max_abs_residual_min = res.iter().copied().fold(0.0, f64::max);
        fit.median_abs_residual_min = median(&mut res);
        fit
    }

    /// File time to reference time.
    pub fn apply(&self, rt: f64) -> f64 {
        interpolate(&self.knots, rt, false)
    }

    /// Reference time to file time (the inverse of [`DriftFit::apply`]; on a flat stretch,
    /// its start).
    pub fn invert(&self, rt: f64) -> f64 {
        interpolate(&self.knots, rt, true)
    }
}

fn interpolate(knots: &[(f64, f64)], v: f64, inverse: bool) -> f64 {
    let get = |k: &(f64, f64)| if inverse { (k.1, k.0) } else { (k.0, k.1) };
    let (Some(first), Some(last)) = (knots.first().map(get), knots.last().map(get)) else {
        return v;
    };
    // Beyond the fitted points: the end-to-end slope (drift that grows with time keeps
    // growing), kept between 1/2 and 2 so the map stays monotone and sane.
    let slope = if last.0 > first.0 {
        ((last.1 - first.1) / (last.0 - first.0)).clamp(0.5, 2.0)
    } else {
        1.0
    };
    if v <= first.0 {
        return first.1 + slope * (v - first.0);
    }
    if v >= last.0 {
        return last.1 + slope * (v - last.0);
    }
    let j = knots.partition_point(|k| get(k).0 < v).max(1);
    let (a, b) = (get(&knots[j - 1]), get(&knots[j]));
    if b.0 <= a.0 {
        return a.1;
    }
    a.1 + (b.1 - a.1) * (v - a.0) / (b.0 - a.0)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn item(file: usize, compound: usize, mass: f64, rt: f64, area: f64) -> Item {
        Item { file, compound, mass, rt, area }
    }

    #[test]
    fn one_row_per_compound_and_one_compound_per_file() {
        // Two compounds 2 ppm apart at the same time, in three files each; a third compound
        // of the same mass 0.3 min later.
        let m = 300.0;
        let d = m * 2e-6;
        let mut items = Vec::new();
        for f in 0..3 {
            let jitter = (f as f64 - 1.0) * 0.2e-6 * m;
            items.push(item(f, 0, m + jitter, 5.0, 1000.0 + f as f64));
            items.push(item(f, 1, m + d - jitter, 5.01, 800.0));
            items.push(item(f, 2, m, 5.3, 900.0));
        }
        let rows = cluster(&items, MassTolerance::Ppm(5.0), 0.1);
        assert_eq!(rows.len(), 3, "{rows:?}");
        for r in &rows {
            let cs: Vec<usize> = r.iter().map(|&i| items[i].compound).collect();
            assert_eq!(cs.len(), 3);
            assert!(cs.iter().all(|&c| c == cs[0]), "mixed row {cs:?}");
        }
    }

    #[test]
    fn rows_do_not_depend_on_item_order() {
        let mut items = Vec::new();
        for f in 0..5 {
            for c in 0..20 {
                let mass = 150.0 + c as f64 * 0.0007 * (c % 3) as f64 + f as f64 * 1e-5;
                items.push(item(f, c, mass, 1.0 + (c % 7) as f64 * 0.04, (c * 31 % 17) as f64));
            }
        }
        let key = |items: &[Item], rows: Vec<Vec<usize>>| {
            let mut k: Vec<Vec<(usize, usize)>> = rows
                .into_iter()
                .map(|r| r.into_iter().map(|i| (items[i].file, items[i].compound)).collect())
                .collect();
            k.sort();
            k
        };
        let a = key(&items, cluster(&items, MassTolerance::Ppm(5.0), 0.1));
        let mut shuffled = items.clone();
        shuffled.reverse();
        shuffled.swap(3, 40);
        let b = key(&shuffled, cluster(&shuffled, MassTolerance::Ppm(5.0), 0.1));
        assert_eq!(a, b);
    }

    #[test]
    fn unit_resolution_uses_da() {
        let items = vec![item(0, 0, 180.1, 4.0, 1.0), item(1, 0, 180.3, 4.02, 1.0)];
        assert_eq!(cluster(&items, MassTolerance::Da(0.3), 0.1).len(), 1);
        assert_eq!(cluster(&items, MassTolerance::Da(0.1), 0.1).len(), 2);
    }

    #[test]
    fn drift_fit_is_monotone_and_reports_residuals() {
        // An outlier that breaks monotonicity is pooled; its residual is reported.
        let pts = [(1.0, 1.1), (2.0, 2.1), (3.0, 2.9), (3.1, 2.8), (4.0, 4.1)];
        let fit = DriftFit::fit(&pts);
        let mut last = f64::NEG_INFINITY;
        for i in 0..60 {
            let y = fit.apply(0.5 + i as f64 * 0.1);
            assert!(y >= last - 1e-12);
            last = y;
        }
        assert!(fit.max_abs_residual_min > 0.04 && fit.max_abs_residual_min < 0.2);
        assert_eq!(fit.anchors, 5);
        assert!(
            (fit.apply(0.0) - 0.1).abs() < 1e-12,
            "the end-to-end slope before the first point"
        );
        assert_eq!(DriftFit::fit(&[]).apply(3.0), 3.0);
    }
}
