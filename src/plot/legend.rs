//! Legends that never cover data.
//!
//! A figure records, in backend pixels, everything its data occupies
//! ([`Occupied`]: line segments, filled regions, bars, markers). The legend goes
//! in the figure's preferred corner of the plot when nothing passes under it,
//! else in the first free corner or free place along a side edge, else in a strip
//! below the plot ([`Placement::Strip`]) — so a legend is never drawn over data.

use super::{err, FONT, LEGEND_PX, LINE_PX};
use plotters::coord::Shift;
use plotters::element::DashedPathElement;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// A corner of the plot area: where a figure would like its legend.
///
/// The legend goes there only if no data passes under it; otherwise it goes in
/// another free corner, or below the plot ([`place`]).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Corner {
    /// Upper left.
    UpperLeft,
    /// Upper right.
    UpperRight,
    /// Lower left.
    LowerLeft,
    /// Lower right.
    LowerRight,
}

/// Shape of a point marker.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Shape {
    /// A circle.
    Circle,
    /// A square.
    Square,
    /// A triangle pointing up.
    Triangle,
    /// A diamond.
    Diamond,
}

impl Shape {
    /// The `i`-th shape (cycling), for series that need more than colour to tell apart.
    pub fn nth(i: usize) -> Shape {
        [Shape::Circle, Shape::Square, Shape::Triangle, Shape::Diamond][i % 4]
    }
}

/// Draws a marker of `shape` centred at `c` (backend pixels) with radius `r`.
pub fn draw_marker<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    c: (i32, i32),
    r: i32,
    shape: Shape,
    colour: RGBColor,
    filled: bool,
) -> Result<(), String> {
    let screen = area.use_screen_coord();
    let style = if filled { colour.filled() } else { colour.stroke_width(LINE_PX.min(5)) };
    let (x, y) = c;
    match shape {
        Shape::Circle => {
            if !filled {
                screen.draw(&Circle::new(c, r, WHITE.filled())).map_err(err)?;
            }
            screen.draw(&Circle::new(c, r, style)).map_err(err)
        }
        Shape::Square => {
            let s = (r as f64 * 0.85) as i32;
            if !filled {
                screen.draw(&Rectangle::new([(x - s, y - s), (x + s, y + s)], WHITE.filled())).map_err(err)?;
            }
            screen.draw(&Rectangle::new([(x - s, y - s), (x + s, y + s)], style)).map_err(err)
        }
        Shape::Triangle => {
            let pts = vec![(x, y - r), (x + r, y + (r * 3) / 4), (x - r, y + (r * 3) / 4)];
            outline_or_fill(&screen, pts, colour, filled)
        }
        Shape::Diamond => {
            let pts = vec![(x, y - r), (x + r, y), (x, y + r), (x - r, y)];
            outline_or_fill(&screen, pts, colour, filled)
        }
    }
}

fn outline_or_fill<DB: DrawingBackend>(
    screen: &DrawingArea<DB, Shift>,
    pts: Vec<(i32, i32)>,
    colour: RGBColor,
    filled: bool,
) -> Result<(), String> {
    if filled {
        screen.draw(&Polygon::new(pts, colour.filled())).map_err(err)
    } else {
        screen.draw(&Polygon::new(pts.clone(), WHITE.filled())).map_err(err)?;
        let mut ring = pts.clone();
        ring.push(pts[0]);
        screen.draw(&PathElement::new(ring, colour.stroke_width(LINE_PX.min(5)))).map_err(err)
    }
}

/// How a legend entry is drawn.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Swatch {
    /// A line sample, solid or dashed.
    Line {
        /// Colour.
        colour: RGBColor,
        /// Dashed when true.
        dashed: bool,
        /// Stroke width, px.
        width: u32,
    },
    /// A filled block (areas, bars, bands), at the given opacity (0–1).
    Fill {
        /// Colour.
        colour: RGBColor,
        /// Opacity, 0–1.
        opacity: f64,
    },
    /// A point marker.
    Marker {
        /// Colour.
        colour: RGBColor,
        /// Shape.
        shape: Shape,
        /// Filled or outlined.
        filled: bool,
    },
    /// A line with a marker on it.
    LineMarker {
        /// Colour.
        colour: RGBColor,
        /// Shape.
        shape: Shape,
    },
}

/// One legend entry.
#[derive(Debug, Clone, PartialEq)]
pub struct Entry {
    /// Text.
    pub label: String,
    /// Sample drawn before the text.
    pub swatch: Swatch,
}

/// A rectangle in backend pixels (`x0 ≤ x1`, `y0 ≤ y1`).
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub struct PxRect {
    /// Left.
    pub x0: i32,
    /// Top.
    pub y0: i32,
    /// Right.
    pub x1: i32,
    /// Bottom.
    pub y1: i32,
}

impl PxRect {
    /// The pixel rectangle of a drawing area.
    pub fn of<DB: DrawingBackend, CT: plotters::coord::CoordTranslate>(area: &DrawingArea<DB, CT>) -> PxRect {
        let (x, y) = area.get_pixel_range();
        PxRect { x0: x.start, y0: y.start, x1: x.end, y1: y.end }
    }

    fn grow(self, by: i32) -> PxRect {
        PxRect { x0: self.x0 - by, y0: self.y0 - by, x1: self.x1 + by, y1: self.y1 + by }
    }

    fn contains(&self, (x, y): (i32, i32)) -> bool {
        x >= self.x0 && x <= self.x1 && y >= self.y0 && y <= self.y1
    }

    fn overlaps(&self, o: &PxRect) -> bool {
        self.x0 <= o.x1 && o.x0 <= self.x1 && self.y0 <= o.y1 && o.y0 <= self.y1
    }
}

/// Everything the data of a figure occupies, in backend pixels.
#[derive(Debug, Clone, Default)]
pub struct Occupied {
    segments: Vec<((i32, i32), (i32, i32))>,
    /// Filled regions as vertical spans `(x, y_top, y_bottom)` sampled along x.
    regions: Vec<Vec<(i32, i32, i32)>>,
    rects: Vec<PxRect>,
}

impl Occupied {
    /// A polyline.
    pub fn line(&mut self, pts: impl IntoIterator<Item = (i32, i32)>) {
        let pts: Vec<(i32, i32)> = pts.into_iter().collect();
        if pts.len() == 1 {
            self.rects.push(PxRect { x0: pts[0].0, y0: pts[0].1, x1: pts[0].0, y1: pts[0].1 });
        }
        for w in pts.windows(2) {
            self.segments.push((w[0], w[1]));
        }
    }

    /// A filled region between two curves, given as `(x, y_a, y_b)` samples in x order.
    pub fn region(&mut self, spans: impl IntoIterator<Item = (i32, i32, i32)>) {
        let v: Vec<(i32, i32, i32)> = spans.into_iter().map(|(x, a, b)| (x, a.min(b), a.max(b))).collect();
        if !v.is_empty() {
            self.regions.push(v);
        }
    }

    /// A filled rectangle between two corners.
    pub fn rect(&mut self, a: (i32, i32), b: (i32, i32)) {
        self.rects.push(PxRect { x0: a.0.min(b.0), y0: a.1.min(b.1), x1: a.0.max(b.0), y1: a.1.max(b.1) });
    }

    /// A marker of radius `r` centred at `c`.
    pub fn point(&mut self, c: (i32, i32), r: i32) {
        self.rect((c.0 - r, c.1 - r), (c.0 + r, c.1 + r));
    }

    /// True when anything recorded lies in `r`.
    pub fn hits(&self, r: &PxRect) -> bool {
        if self.rects.iter().any(|q| q.overlaps(r)) {
            return true;
        }
        for &(a, b) in &self.segments {
            let len = ((b.0 - a.0).abs().max((b.1 - a.1).abs())).max(1);
            let steps = (len / 3).max(1);
            for k in 0..=steps {
                let t = k as f64 / steps as f64;
                let p = ((a.0 as f64 + t * (b.0 - a.0) as f64).round() as i32, (a.1 as f64 + t * (b.1 - a.1) as f64).round() as i32);
                if r.contains(p) {
                    return true;
                }
            }
        }
        for reg in &self.regions {
            if let [(x, top, bottom)] = reg[..] {
                if x >= r.x0 && x <= r.x1 && top <= r.y1 && bottom >= r.y0 {
                    return true;
                }
                continue;
            }
            for w in reg.windows(2) {
                let (a, b) = (w[0], w[1]);
                if a.0.max(b.0) < r.x0 || a.0.min(b.0) > r.x1 {
                    continue;
                }
                let steps = ((b.0 - a.0).abs() / 3).max(1);
                for k in 0..=steps {
                    let t = k as f64 / steps as f64;
                    let x = a.0 as f64 + t * (b.0 - a.0) as f64;
                    if x < r.x0 as f64 || x > r.x1 as f64 {
                        continue;
                    }
                    let top = a.1 as f64 + t * (b.1 - a.1) as f64;
                    let bottom = a.2 as f64 + t * (b.2 - a.2) as f64;
                    if top <= r.y1 as f64 && bottom >= r.y0 as f64 {
                        return true;
                    }
                }
            }
        }
        false
    }
}

/// Where the legend goes.
#[derive(Debug, Clone, Copy, PartialEq, Eq)]
pub enum Placement {
    /// A box inside the plot, at this rectangle.
    Inside(PxRect),
    /// A strip below the plot, this many pixels high.
    Strip(u32),
    /// No legend (no entries).
    None,
}

const PAD: i32 = 22;
const SAMPLE_W: i32 = 76;
const GAP: i32 = 18;
const CLEARANCE: i32 = 14;

fn label_style() -> TextStyle<'static> {
    TextStyle::from((FONT, LEGEND_PX).into_font()).pos(Pos::new(HPos::Left, VPos::Center))
}

fn row_h() -> i32 {
    (LEGEND_PX as f64 * 1.5) as i32
}

/// Width reserved for a label: the embedded font's width plus 12 %, because an
/// SVG viewer draws the text with its own sans-serif face, often a little wider.
fn label_width<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, label: &str) -> i32 {
    (super::axes::text_width(area, label, &label_style()) as f64 * 1.12).ceil() as i32
}

/// Size of the legend box, px.
pub fn box_size<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, entries: &[Entry]) -> (i32, i32) {
    let w = entries.iter().map(|e| label_width(area, &e.label)).max().unwrap_or(0);
    (2 * PAD + SAMPLE_W + GAP + w, 2 * PAD + row_h() * entries.len() as i32 - (row_h() - LEGEND_PX as i32) / 2)
}

/// Rows of a legend strip of width `width`: indices of the entries on each row.
fn strip_rows<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, entries: &[Entry], width: i32) -> Vec<Vec<usize>> {
    let mut rows: Vec<Vec<usize>> = vec![];
    let mut used = 0;
    for (i, e) in entries.iter().enumerate() {
        let w = SAMPLE_W + GAP + label_width(area, &e.label) + 3 * PAD;
        if rows.is_empty() || used + w > width {
            rows.push(vec![i]);
            used = w;
        } else {
            if let Some(r) = rows.last_mut() {
                r.push(i);
            }
            used += w;
        }
    }
    rows
}

/// Height of a legend strip below a plot on `area`, px.
pub fn strip_height<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, entries: &[Entry]) -> u32 {
    if entries.is_empty() {
        return 0;
    }
    let (w, _) = area.dim_in_pixel();
    let rows = strip_rows(area, entries, w as i32 - 2 * PAD).len() as i32;
    (rows * row_h() + 2 * PAD) as u32
}

/// Chooses where the legend goes: the preferred corner of `plot`, another free
/// corner, a free place along the left or right edge, or a strip below the plot
/// when every one of those would cover data.
pub fn place<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    entries: &[Entry],
    plot: PxRect,
    preferred: Corner,
    data: &Occupied,
) -> Placement {
    if entries.is_empty() {
        return Placement::None;
    }
    let (w, h) = box_size(area, entries);
    let order = {
        let all = [Corner::UpperRight, Corner::UpperLeft, Corner::LowerRight, Corner::LowerLeft];
        let mut v = vec![preferred];
        v.extend(all.iter().copied().filter(|c| *c != preferred));
        v
    };
    let inset = 16;
    if w + 2 * inset < plot.x1 - plot.x0 && h + 2 * inset < plot.y1 - plot.y0 {
        for c in order {
            let (x0, y0) = match c {
                Corner::UpperLeft => (plot.x0 + inset, plot.y0 + inset),
                Corner::UpperRight => (plot.x1 - inset - w, plot.y0 + inset),
                Corner::LowerLeft => (plot.x0 + inset, plot.y1 - inset - h),
                Corner::LowerRight => (plot.x1 - inset - w, plot.y1 - inset - h),
            };
            let r = PxRect { x0, y0, x1: x0 + w, y1: y0 + h };
            if !data.hits(&r.grow(CLEARANCE)) {
                return Placement::Inside(r);
            }
        }
        // Then along the left and right edges, from the top down (data often
        // leave a band free between a guideline and the series).
        let (left, right) = (plot.x0 + inset, plot.x1 - inset - w);
        let xs = match preferred {
            Corner::UpperLeft | Corner::LowerLeft => [left, right],
            _ => [right, left],
        };
        let steps = 24;
        for k in 1..steps {
            let y0 = plot.y0 + inset + (plot.y1 - plot.y0 - 2 * inset - h) * k / steps;
            for &x0 in &xs {
                let r = PxRect { x0, y0, x1: x0 + w, y1: y0 + h };
                if !data.hits(&r.grow(CLEARANCE)) {
                    return Placement::Inside(r);
                }
            }
        }
    }
    Placement::Strip(strip_height(area, entries))
}

fn draw_swatch<DB: DrawingBackend>(screen: &DrawingArea<DB, Shift>, x: i32, y: i32, s: &Swatch) -> Result<(), String> {
    let half = LEGEND_PX as i32 / 2;
    match *s {
        Swatch::Line { colour, dashed, width } => {
            let style = ShapeStyle { color: colour.to_rgba(), filled: false, stroke_width: width };
            if dashed {
                screen.draw(&DashedPathElement::new(vec![(x, y), (x + SAMPLE_W, y)], 18, 10, style)).map_err(err)
            } else {
                screen.draw(&PathElement::new(vec![(x, y), (x + SAMPLE_W, y)], style)).map_err(err)
            }
        }
        Swatch::Fill { colour, opacity } => {
            screen.draw(&Rectangle::new([(x, y - half), (x + SAMPLE_W, y + half)], colour.mix(opacity).filled())).map_err(err)?;
            screen.draw(&Rectangle::new([(x, y - half), (x + SAMPLE_W, y + half)], colour.stroke_width(2))).map_err(err)
        }
        Swatch::Marker { colour, shape, filled } => draw_marker(screen, (x + SAMPLE_W / 2, y), half - 2, shape, colour, filled),
        Swatch::LineMarker { colour, shape } => {
            screen.draw(&PathElement::new(vec![(x, y), (x + SAMPLE_W, y)], colour.stroke_width(LINE_PX))).map_err(err)?;
            draw_marker(screen, (x + SAMPLE_W / 2, y), half - 4, shape, colour, true)
        }
    }
}

/// Draws the legend box at `r` (backend pixels) on any area of the figure.
pub fn draw_box<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, entries: &[Entry], r: PxRect) -> Result<(), String> {
    let screen = area.use_screen_coord();
    screen.draw(&Rectangle::new([(r.x0, r.y0), (r.x1, r.y1)], WHITE.filled())).map_err(err)?;
    screen.draw(&Rectangle::new([(r.x0, r.y0), (r.x1, r.y1)], RGBColor(150, 150, 150).stroke_width(2))).map_err(err)?;
    let mut y = r.y0 + PAD + LEGEND_PX as i32 / 2;
    for e in entries {
        draw_swatch(&screen, r.x0 + PAD, y, &e.swatch)?;
        screen.draw(&Text::new(e.label.clone(), (r.x0 + PAD + SAMPLE_W + GAP, y), label_style())).map_err(err)?;
        y += row_h();
    }
    Ok(())
}

/// Draws the legend as centred rows filling the strip `area` below a plot.
pub fn draw_strip<DB: DrawingBackend>(area: &DrawingArea<DB, Shift>, entries: &[Entry]) -> Result<(), String> {
    let (w, _) = area.dim_in_pixel();
    let (bx, by) = area.get_base_pixel();
    let screen = area.use_screen_coord();
    let rows = strip_rows(area, entries, w as i32 - 2 * PAD);
    let mut y = by + PAD + LEGEND_PX as i32 / 2;
    for row in rows {
        let widths: Vec<i32> = row.iter().map(|&i| SAMPLE_W + GAP + label_width(area, &entries[i].label)).collect();
        let total: i32 = widths.iter().sum::<i32>() + 3 * PAD * (row.len() as i32 - 1);
        let mut x = bx + ((w as i32 - total) / 2).max(PAD);
        for (&i, wi) in row.iter().zip(&widths) {
            draw_swatch(&screen, x, y, &entries[i].swatch)?;
            screen.draw(&Text::new(entries[i].label.clone(), (x + SAMPLE_W + GAP, y), label_style())).map_err(err)?;
            x += wi + 3 * PAD;
        }
        y += row_h();
    }
    Ok(())
}

/// Draws the legend where [`place`] put it; `strip` is the area below the plot
/// when the placement is a strip.
pub fn draw<DB: DrawingBackend>(
    area: &DrawingArea<DB, Shift>,
    strip: Option<&DrawingArea<DB, Shift>>,
    entries: &[Entry],
    placement: Placement,
) -> Result<(), String> {
    match (placement, strip) {
        (Placement::Inside(r), _) => draw_box(area, entries, r),
        (Placement::Strip(_), Some(s)) => draw_strip(s, entries),
        _ => Ok(()),
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn segments_and_regions_hit_only_where_they_pass() {
        let mut o = Occupied::default();
        o.line([(0, 100), (1000, 100)]);
        assert!(o.hits(&PxRect { x0: 400, y0: 90, x1: 500, y1: 110 }));
        assert!(!o.hits(&PxRect { x0: 400, y0: 120, x1: 500, y1: 200 }));
        let mut r = Occupied::default();
        r.region([(0, 500, 900), (1000, 300, 900)]);
        // Above the region's top everywhere in the box: free.
        assert!(!r.hits(&PxRect { x0: 0, y0: 0, x1: 200, y1: 250 }));
        // Reaching into it at the right: hit.
        assert!(r.hits(&PxRect { x0: 800, y0: 300, x1: 1000, y1: 400 }));
    }
}
