//! Where a map's flow arrow goes: from a point inside the upstream area, across
//! the boundary it shares with the downstream area, to a point inside that one.
//!
//! An arrow drawn from one area's label to the other's crosses whatever lies
//! between (other catchments and their labels), and a reader cannot tell which
//! catchment drains where. Here each arrow is a short straight segment
//! perpendicular to the shared boundary, centred on a point of it: its tail lies
//! in the upstream area, its head in the downstream one, and nothing else is
//! crossed (every point of the tail half is tested inside the upstream area, of
//! the head half inside the downstream area, holes excluded).
//!
//! # Method
//!
//! 1. The shared boundary: points along the upstream area's rings (every edge
//!    cut into pieces no longer than 1/400 of the pair's extent) that lie within
//!    1/1000 of the extent of the downstream area's rings. Runs of consecutive
//!    shared points are the shared stretches, longest first. Areas that do not
//!    touch use their closest approach (within 1/20 of the extent).
//! 2. Candidate crossing points: 50 %, then 35, 65, 20, 80, 10 and 90 % of the
//!    way along each stretch; the arrow is the normal to the boundary there, pointing into
//!    the downstream area.
//! 3. Each candidate is tried at full length and shorter (down to 30 %); it is
//!    valid when both halves stay inside their areas, with a quarter of the
//!    half-length to spare beyond each end. An arrow clear of every box to avoid
//!    (the map's labels) beats one that is not; then the longer one; then the
//!    one nearest the middle of the longest stretch.
//!
//! Common practice, no published source: a cartographic convention of flow
//! maps, not a published algorithm.

/// One polygon in map kilometres: exterior ring and holes (closed or not).
#[derive(Debug, Clone, Default)]
pub struct MapPolygon {
    /// Exterior ring.
    pub exterior: Vec<(f64, f64)>,
    /// Holes.
    pub holes: Vec<Vec<(f64, f64)>>,
}

/// Room left beyond each end of an arrow inside its area, as a fraction of the
/// half-length, so that a tip never touches the far side of a narrow area.
const END_MARGIN: f64 = 0.25;

/// A box to keep arrows off, km: `(x_min, y_min, x_max, y_max)`.
pub type KmBox = (f64, f64, f64, f64);

/// An arrow, km: `(tail, head)`.
pub type Arrow = ((f64, f64), (f64, f64));

/// Even–odd test of a point against a ring.
pub fn inside_ring(p: (f64, f64), ring: &[(f64, f64)]) -> bool {
    let mut inside = false;
    let n = ring.len();
    for i in 0..n {
        let (a, b) = (ring[i], ring[(i + 1) % n]);
        if (a.1 > p.1) != (b.1 > p.1) && p.0 < a.0 + (p.1 - a.1) * (b.0 - a.0) / (b.1 - a.1) {
            inside = !inside;
        }
    }
    inside
}

/// Whether `p` lies in the area (in one of its polygons and in none of that
/// polygon's holes).
pub fn inside_area(p: (f64, f64), polygons: &[MapPolygon]) -> bool {
    polygons.iter().any(|poly| inside_ring(p, &poly.exterior) && !poly.holes.iter().any(|h| inside_ring(p, h)))
}

fn rings(polygons: &[MapPolygon]) -> impl Iterator<Item = &Vec<(f64, f64)>> {
    polygons.iter().flat_map(|p| std::iter::once(&p.exterior).chain(p.holes.iter()))
}

/// Edges of a ring, closing it if it is open.
fn edges(ring: &[(f64, f64)]) -> impl Iterator<Item = ((f64, f64), (f64, f64))> + '_ {
    let n = ring.len();
    let closed = n > 1 && ring[0] == ring[n - 1];
    let m = if closed { n - 1 } else { n };
    (0..m).map(move |i| (ring[i], ring[(i + 1) % n]))
}

fn closest_on_segment(p: (f64, f64), a: (f64, f64), b: (f64, f64)) -> (f64, f64) {
    let (dx, dy) = (b.0 - a.0, b.1 - a.1);
    let len2 = dx * dx + dy * dy;
    let t = if len2 > 0.0 { (((p.0 - a.0) * dx + (p.1 - a.1) * dy) / len2).clamp(0.0, 1.0) } else { 0.0 };
    (a.0 + t * dx, a.1 + t * dy)
}

fn dist(a: (f64, f64), b: (f64, f64)) -> f64 {
    ((a.0 - b.0).powi(2) + (a.1 - b.1).powi(2)).sqrt()
}

/// The point of the area's boundary closest to `p`.
fn closest_on_boundary(p: (f64, f64), polygons: &[MapPolygon]) -> Option<(f64, f64)> {
    rings(polygons).flat_map(|r| edges(r)).map(|(a, b)| closest_on_segment(p, a, b)).min_by(|u, v| dist(p, *u).total_cmp(&dist(p, *v)))
}

/// Bounding box of several areas.
fn extent(areas: &[&[MapPolygon]]) -> Option<KmBox> {
    let mut b = (f64::INFINITY, f64::INFINITY, f64::NEG_INFINITY, f64::NEG_INFINITY);
    for p in areas.iter().flat_map(|a| a.iter()).flat_map(|p| &p.exterior) {
        b = (b.0.min(p.0), b.1.min(p.1), b.2.max(p.0), b.3.max(p.1));
    }
    b.0.is_finite().then_some(b)
}

/// A sample of the upstream boundary: where, the boundary's direction there, and
/// how far it is from the downstream area's boundary.
#[derive(Debug, Clone, Copy)]
struct Sample {
    at: (f64, f64),
    tangent: (f64, f64),
    gap: f64,
}

/// Samples along every ring of `from`, each ring's samples in order.
fn samples(from: &[MapPolygon], to: &[MapPolygon], step: f64) -> Vec<Vec<Sample>> {
    rings(from)
        .map(|ring| {
            let mut out = Vec::new();
            for (a, b) in edges(ring) {
                let len = dist(a, b);
                if len <= 0.0 {
                    continue;
                }
                let tangent = ((b.0 - a.0) / len, (b.1 - a.1) / len);
                let k = (len / step).ceil().max(1.0) as usize;
                for j in 0..k {
                    let t = (j as f64 + 0.5) / k as f64;
                    let at = (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1));
                    let gap = closest_on_boundary(at, to).map(|c| dist(at, c)).unwrap_or(f64::INFINITY);
                    out.push(Sample { at, tangent, gap });
                }
            }
            out
        })
        .collect()
}

/// Runs of consecutive samples with `gap <= tol` in a ring's samples (a run may
/// wrap past the ring's start), as lists of samples in order.
fn shared_runs(ring: &[Sample], tol: f64) -> Vec<Vec<Sample>> {
    let n = ring.len();
    let shared: Vec<bool> = ring.iter().map(|s| s.gap <= tol).collect();
    if n == 0 || !shared.iter().any(|&s| s) {
        return Vec::new();
    }
    if shared.iter().all(|&s| s) {
        return vec![ring.to_vec()];
    }
    // Start just after an unshared sample so that no run is cut at the ring's start.
    let start = (0..n).find(|&i| !shared[i]).map(|i| (i + 1) % n).unwrap_or(0);
    let mut runs = Vec::new();
    let mut cur = Vec::new();
    for k in 0..n {
        let i = (start + k) % n;
        if shared[i] {
            cur.push(ring[i]);
        } else if !cur.is_empty() {
            runs.push(std::mem::take(&mut cur));
        }
    }
    if !cur.is_empty() {
        runs.push(cur);
    }
    runs
}

/// The sample a fraction `f` of the way along a run (by arc length).
fn along(run: &[Sample], f: f64) -> Sample {
    let mut cum = vec![0.0];
    for w in run.windows(2) {
        cum.push(cum.last().copied().unwrap_or(0.0) + dist(w[0].at, w[1].at));
    }
    let total = cum.last().copied().unwrap_or(0.0);
    let i = cum.iter().position(|&c| c >= f * total).unwrap_or(run.len() - 1);
    run[i]
}

fn run_length(run: &[Sample]) -> f64 {
    run.windows(2).map(|w| dist(w[0].at, w[1].at)).sum()
}

/// Whether the straight path `a → b` stays inside the area, tested at `n` points
/// (both ends excluded: one end is on the boundary), except within `slack` of `b`
/// (the gap between areas that do not quite touch).
fn stays_inside(a: (f64, f64), b: (f64, f64), polygons: &[MapPolygon], n: usize, slack: f64) -> bool {
    (1..=n).all(|k| {
        let t = k as f64 / (n + 1) as f64;
        let p = (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1));
        inside_area(p, polygons) || dist(p, b) <= slack
    })
}

/// Whether the segment `a → b` passes through the box (tested at 40 points).
fn hits_box(a: (f64, f64), b: (f64, f64), bx: &KmBox) -> bool {
    (0..=40).any(|k| {
        let t = k as f64 / 40.0;
        let p = (a.0 + t * (b.0 - a.0), a.1 + t * (b.1 - a.1));
        p.0 >= bx.0 && p.0 <= bx.2 && p.1 >= bx.1 && p.1 <= bx.3
    })
}

/// A flow arrow from the area `from` into the area `to`, as `(tail, head)` in
/// km, at most `2 · half_km` long (shorter where an area is narrow), crossing
/// their shared boundary and clear of the `avoid` boxes where it can be. `None`
/// when the areas neither touch nor come close, or no arrow fits.
pub fn flow_arrow(from: &[MapPolygon], to: &[MapPolygon], half_km: f64, avoid: &[KmBox]) -> Option<Arrow> {
    let bb = extent(&[from, to])?;
    let size = ((bb.2 - bb.0).powi(2) + (bb.3 - bb.1).powi(2)).sqrt();
    if !(size > 0.0 && half_km > 0.0) {
        return None;
    }
    let tol = size / 1000.0;
    let per_ring = samples(from, to, size / 400.0);
    let mut runs: Vec<Vec<Sample>> = per_ring.iter().flat_map(|r| shared_runs(r, tol)).collect();
    runs.sort_by(|a, b| run_length(b).total_cmp(&run_length(a)));
    let mut candidates: Vec<Sample> = Vec::new();
    for run in &runs {
        for f in [0.5, 0.35, 0.65, 0.2, 0.8, 0.1, 0.9] {
            candidates.push(along(run, f));
        }
    }
    // Half the gap between the areas, where they do not touch.
    let mut slack = 0.0;
    if candidates.is_empty() {
        // No shared stretch: the closest approach, when close.
        let near = per_ring.iter().flatten().min_by(|a, b| a.gap.total_cmp(&b.gap))?;
        if near.gap > size / 20.0 {
            return None;
        }
        let c = closest_on_boundary(near.at, to)?;
        slack = near.gap / 2.0 + tol;
        candidates.push(Sample { at: ((near.at.0 + c.0) / 2.0, (near.at.1 + c.1) / 2.0), tangent: near.tangent, gap: near.gap });
    }
    let probe = slack + tol * 4.0;
    // (clear of the boxes, length factor, -candidate rank) → larger is better.
    let mut best: Option<((bool, f64, i64), Arrow)> = None;
    for (rank, s) in candidates.iter().enumerate() {
        let normal = (-s.tangent.1, s.tangent.0);
        let c = s.at;
        let sign = if inside_area((c.0 + normal.0 * probe, c.1 + normal.1 * probe), to) {
            1.0
        } else if inside_area((c.0 - normal.0 * probe, c.1 - normal.1 * probe), to) {
            -1.0
        } else {
            continue;
        };
        let n = (normal.0 * sign, normal.1 * sign);
        for factor in [1.0, 0.75, 0.55, 0.4, 0.3] {
            let h = half_km * factor;
            let tail = (c.0 - n.0 * h, c.1 - n.1 * h);
            let head = (c.0 + n.0 * h, c.1 + n.1 * h);
            // The ends keep a quarter of the half-length clear of the far boundary.
            let margin = 1.0 + END_MARGIN;
            let fits = inside_area((c.0 - n.0 * h * margin, c.1 - n.1 * h * margin), from)
                && inside_area((c.0 + n.0 * h * margin, c.1 + n.1 * h * margin), to)
                && inside_area(tail, from)
                && inside_area(head, to)
                && stays_inside(tail, c, from, 24, slack)
                && stays_inside(head, c, to, 24, slack);
            if !fits {
                continue;
            }
            let clear = !avoid.iter().any(|b| hits_box(tail, head, b));
            let score = (clear, factor, -(rank as i64));
            if best.as_ref().is_none_or(|(b, _)| score.partial_cmp(b) == Some(std::cmp::Ordering::Greater)) {
                best = Some((score, (tail, head)));
            }
            if clear {
                // Shorter arrows here would only rank lower.
                break;
            }
        }
    }
    best.map(|(_, arrow)| arrow)
}

#[cfg(test)]
mod tests {
    use super::*;

    fn rect(x0: f64, y0: f64, x1: f64, y1: f64) -> MapPolygon {
        MapPolygon { exterior: vec![(x0, y0), (x1, y0), (x1, y1), (x0, y1)], holes: vec![] }
    }

    #[test]
    fn an_arrow_crosses_the_shared_edge_at_right_angles() {
        // Two squares side by side, sharing the edge x = 2 from y = 0 to 2.
        let a = [rect(0.0, 0.0, 2.0, 2.0)];
        let b = [rect(2.0, 0.0, 4.0, 2.0)];
        let (tail, head) = flow_arrow(&a, &b, 0.5, &[]).unwrap();
        assert!(inside_area(tail, &a) && inside_area(head, &b), "{tail:?} {head:?}");
        assert!((tail.1 - head.1).abs() < 1e-9, "perpendicular to a vertical edge");
        assert!((tail.0 - 1.5).abs() < 1e-6 && (head.0 - 2.5).abs() < 1e-6, "{tail:?} {head:?}");
        assert!((tail.1 - 1.0).abs() < 0.05, "in the middle of the shared edge: {tail:?}");
        // And the other way round.
        let (t2, h2) = flow_arrow(&b, &a, 0.5, &[]).unwrap();
        assert!(inside_area(t2, &b) && inside_area(h2, &a));
    }

    #[test]
    fn an_arrow_shortens_in_a_narrow_area_and_keeps_off_labels() {
        // A thin strip (0.2 km deep) below a square: the arrow's tail half must fit in it.
        let strip = [rect(0.0, -0.2, 4.0, 0.0)];
        let square = [rect(0.0, 0.0, 4.0, 4.0)];
        let (tail, head) = flow_arrow(&strip, &square, 0.5, &[]).unwrap();
        assert!(inside_area(tail, &strip) && inside_area(head, &square));
        assert!(dist(tail, head) < 0.5, "{tail:?} {head:?}");
        // A label box over the middle of the shared edge pushes the arrow aside.
        let label = (1.5, -0.5, 2.5, 0.5);
        let (tail, head) = flow_arrow(&strip, &square, 0.15, &[label]).unwrap();
        assert!(!hits_box(tail, head, &label), "{tail:?} {head:?}");
        assert!(inside_area(tail, &strip) && inside_area(head, &square));
    }

    #[test]
    fn holes_are_outside_and_far_areas_get_no_arrow() {
        let mut holed = rect(2.0, 0.0, 6.0, 4.0);
        holed.holes.push(vec![(2.2, 1.0), (3.0, 1.0), (3.0, 3.0), (2.2, 3.0)]);
        assert!(!inside_area((2.5, 2.0), std::slice::from_ref(&holed)));
        let a = [rect(0.0, 0.0, 2.0, 4.0)];
        let (tail, head) = flow_arrow(&a, std::slice::from_ref(&holed), 0.4, &[]).unwrap();
        // The head must not land in the hole, so the arrow crosses away from it (or is short).
        assert!(inside_area(head, std::slice::from_ref(&holed)) && stays_inside(tail, head, &[a[0].clone(), holed.clone()], 50, 0.0));
        let far = [rect(10.0, 0.0, 12.0, 2.0)];
        assert!(flow_arrow(&a, &far, 0.5, &[]).is_none());
        // Not touching but close (a 0.05 km gap): the arrow spans the gap.
        let near = [rect(2.05, 0.0, 4.0, 4.0)];
        let (tail, head) = flow_arrow(&a, &near, 0.5, &[]).unwrap();
        assert!(inside_area(tail, &a) && inside_area(head, &near));
    }
}
