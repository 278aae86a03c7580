//! Choropleth maps: areas filled by class of a value, with labels, flow arrows
//! between areas, a legend of the class breaks, a scale bar and a north arrow.
//!
//! The figure works in kilometres of an already projected plane (x east,
//! y north; see `crate::plot::projection`) and keeps one scale for both axes, so
//! shapes are drawn as projected. Everything but the map itself (legend, scale
//! bar, notes) sits in a panel to the right of the map, never over the areas.
//!
//! Colours: losses (negative values) on a warm ramp from pale parchment through
//! the palette's sand and burnt orange to deep rust; gains on a cool ramp from
//! pale mint through the palette's sea green to its deep blue. Both ramps fall
//! steadily in lightness, so classes stay in order in greyscale.

pub use super::flow_arrows::MapPolygon;
use super::flow_arrows::{flow_arrow, inside_ring, KmBox};
use super::{err, palette, Figure, FONT};
use crate::schema::numbers::{readable, Thousands};
use plotters::coord::Shift;
use plotters::prelude::*;
use plotters::style::text_anchor::{HPos, Pos, VPos};

/// Warm ramp for losses, from the smallest loss (t = 0) to the largest (t = 1).
pub const LOSS_RAMP: [(f64, RGBColor); 4] =
    [(0.0, RGBColor(0xf6, 0xed, 0xd9)), (0.35, palette::SCATTERED), (0.7, palette::MEDIUM), (1.0, RGBColor(0x6b, 0x2a, 0x17))];

/// Cool ramp for gains, from the smallest gain (t = 0) to the largest (t = 1).
pub const GAIN_RAMP: [(f64, RGBColor); 3] = [(0.0, RGBColor(0xdc, 0xef, 0xe8)), (0.5, palette::UNINVADED), (1.0, palette::YIELD)];

/// Fill of areas with no value.
pub const NO_VALUE: RGBColor = RGBColor(0xd4, 0xd4, 0xd4);

/// Flow arrows.
pub const FLOW: RGBColor = RGBColor(0x12, 0x2f, 0x55);

/// Half the length of a flow arrow, px at a 1000 px tall figure (shorter where
/// an area is narrow).
const ARROW_HALF_PX: f64 = 62.0;

/// Area outlines.
const OUTLINE: RGBColor = RGBColor(0x3a, 0x3a, 0x3a);
/// Text.
const DARK: RGBColor = RGBColor(0x22, 0x22, 0x22);
/// Secondary text.
const GREY: RGBColor = RGBColor(0x55, 0x55, 0x55);

fn text_style(size_px: f64, colour: &'static RGBColor, hpos: HPos, vpos: VPos) -> TextStyle<'static> {
    TextStyle::from((FONT, size_px)).color(colour).pos(Pos::new(hpos, vpos))
}

/// Colour at `t` (0..=1) along a ramp of `(position, colour)` anchors (linear in sRGB).
pub fn ramp(anchors: &[(f64, RGBColor)], t: f64) -> RGBColor {
    let t = t.clamp(0.0, 1.0);
    for w in anchors.windows(2) {
        let ((t0, c0), (t1, c1)) = (w[0], w[1]);
        if t <= t1 {
            let u = if t1 > t0 { (t - t0) / (t1 - t0) } else { 0.0 };
            let mix = |a: u8, b: u8| (a as f64 + (b as f64 - a as f64) * u).round() as u8;
            return RGBColor(mix(c0.0, c1.0), mix(c0.1, c1.1), mix(c0.2, c1.2));
        }
    }
    anchors.last().map(|a| a.1).unwrap_or(NO_VALUE)
}

/// Class breaks of a map: `breaks[i]..breaks[i + 1]` is class `i`.
#[derive(Debug, Clone, PartialEq)]
pub struct Classes {
    /// Increasing break values; zero is always one of them.
    pub breaks: Vec<f64>,
    /// Fill of each class (one fewer than the breaks).
    pub colours: Vec<RGBColor>,
    /// Decimals used in legend labels.
    pub decimals: usize,
}

/// The "nice" step (1, 2, 2.5 or 5 × 10ⁿ) nearest to `raw` (by ratio).
pub fn nice_step(raw: f64) -> f64 {
    if raw.is_nan() || raw <= 0.0 || raw.is_infinite() {
        return 1.0;
    }
    let mag = 10f64.powf(raw.log10().floor());
    [1.0, 2.0, 2.5, 5.0, 10.0]
        .into_iter()
        .map(|m| m * mag)
        .min_by(|a, b| (a / raw).ln().abs().total_cmp(&(b / raw).ln().abs()))
        .unwrap_or(mag)
}

impl Classes {
    /// Equal-interval classes with a nice step covering `values` and zero, about
    /// `target` classes in all; losses below zero take the warm ramp, gains the
    /// cool one. Values at a break below zero belong to the class below it
    /// (so −5 is in "−10 to −5" and 0 in "−5 to 0"); at or above zero, to the
    /// class above it.
    pub fn diverging(values: &[f64], target: usize) -> Classes {
        let finite = values.iter().copied().filter(|v| v.is_finite());
        let (lo, hi) = finite.fold((0.0f64, 0.0f64), |(a, b), v| (a.min(v), b.max(v)));
        let step = if hi > lo { nice_step((hi - lo) / target.max(1) as f64) } else { 1.0 };
        let n_lo = (-lo / step - 1e-9).ceil().max(if hi > 0.0 { 0.0 } else { 1.0 }) as i64;
        let n_hi = (hi / step - 1e-9).ceil().max(0.0) as i64;
        let breaks: Vec<f64> = (-n_lo..=n_hi).map(|k| k as f64 * step).collect();
        let colours = breaks
            .windows(2)
            .map(|w| {
                if w[1] <= 0.0 {
                    // Loss class k of n_lo, counted from zero downwards.
                    let k = (-w[0] / step).round();
                    ramp(&LOSS_RAMP, if n_lo > 1 { (k - 1.0) / (n_lo as f64 - 1.0) * 0.85 + 0.15 } else { 0.35 })
                } else {
                    let k = (w[1] / step).round();
                    ramp(&GAIN_RAMP, if n_hi > 1 { (k - 1.0) / (n_hi as f64 - 1.0) * 0.85 + 0.15 } else { 0.5 })
                }
            })
            .collect();
        let decimals = (0..=4).find(|&d| {
            let x = step * 10f64.powi(d as i32);
            (x - x.round()).abs() < 1e-6
        });
        let decimals = decimals.unwrap_or(4);
        Classes { breaks, colours, decimals }
    }

    /// Class of a value (`None` for no value or outside the breaks).
    pub fn class_of(&self, v: Option<f64>) -> Option<usize> {
        let v = v.filter(|v| v.is_finite())?;
        let n = self.colours.len();
        (0..n).find(|&i| {
            let (a, b) = (self.breaks[i], self.breaks[i + 1]);
            if b <= 0.0 {
                v > a && v <= b || (i == 0 && v == a)
            } else {
                v >= a && v < b || (i == n - 1 && v == b)
            }
        })
    }

    /// Legend text of class `i`, e.g. "−10 to −5".
    pub fn label(&self, i: usize) -> String {
        format!("{} to {}", map_number(self.breaks[i], self.decimals), map_number(self.breaks[i + 1], self.decimals))
    }
}

/// A number of a map's legend or labels: a true minus sign (U+2212), e.g.
/// "−12.5", never thousands-grouped (map text has always been plain).
pub fn map_number(v: f64, decimals: usize) -> String {
    readable(v, decimals, Thousands::Plain).unwrap_or_default()
}

/// One mapped area (a catchment).
#[derive(Debug, Clone, Default)]
pub struct MapArea {
    /// Name shown on the map.
    pub label: String,
    /// The value mapped (`None`: no value).
    pub value: Option<f64>,
    /// The value as shown under the name (e.g. "−24.6 %").
    pub value_text: String,
    /// The area's polygons, km.
    pub polygons: Vec<MapPolygon>,
    /// Point for the label and for flow arrows, km (inside the area).
    pub anchor: (f64, f64),
}

/// A choropleth map figure.
#[derive(Debug, Clone)]
pub struct ChoroplethMap {
    /// Title (what is mapped, when).
    pub title: String,
    /// Second title line (e.g. the scenario).
    pub subtitle: String,
    /// Legend heading with the unit.
    pub legend_title: String,
    /// Class breaks and fills.
    pub classes: Classes,
    /// The areas.
    pub areas: Vec<MapArea>,
    /// Flow arrows `(from, to)` as indices into `areas`; each is drawn across the
    /// two areas' shared boundary ([`flow_arrow`]).
    pub arrows: Vec<(usize, usize)>,
    /// Draw labels (and flow arrows); off for crowded maps.
    pub show_labels: bool,
    /// Notes printed at the foot of the panel (projection, sources), each wrapped.
    pub notes: Vec<String>,
}

/// Pixel transform of the map: km → pixels with one scale for both axes.
#[derive(Debug, Clone, Copy)]
struct View {
    px_per_km: f64,
    cx_km: f64,
    cy_km: f64,
    cx_px: f64,
    cy_px: f64,
}

impl View {
    fn fit(areas: &[MapArea], rect: (i32, i32, i32, i32)) -> View {
        let mut b = (f64::INFINITY, f64::INFINITY, f64::NEG_INFINITY, f64::NEG_INFINITY);
        for p in areas.iter().flat_map(|a| &a.polygons).flat_map(|p| &p.exterior) {
            b = (b.0.min(p.0), b.1.min(p.1), b.2.max(p.0), b.3.max(p.1));
        }
        if !b.0.is_finite() {
            b = (-1.0, -1.0, 1.0, 1.0);
        }
        let (w_km, h_km) = ((b.2 - b.0).max(1e-6) * 1.06, (b.3 - b.1).max(1e-6) * 1.06);
        let (w_px, h_px) = ((rect.2 - rect.0) as f64, (rect.3 - rect.1) as f64);
        View {
            px_per_km: (w_px / w_km).min(h_px / h_km),
            cx_km: (b.0 + b.2) / 2.0,
            cy_km: (b.1 + b.3) / 2.0,
            cx_px: (rect.0 + rect.2) as f64 / 2.0,
            cy_px: (rect.1 + rect.3) as f64 / 2.0,
        }
    }

    fn px(&self, p: (f64, f64)) -> (f64, f64) {
        (self.cx_px + (p.0 - self.cx_km) * self.px_per_km, self.cy_px - (p.1 - self.cy_km) * self.px_per_km)
    }

    /// Pixels back to km.
    fn km(&self, p: (f64, f64)) -> (f64, f64) {
        (self.cx_km + (p.0 - self.cx_px) / self.px_per_km, self.cy_km - (p.1 - self.cy_px) / self.px_per_km)
    }

    fn ipx(&self, p: (f64, f64)) -> (i32, i32) {
        let (x, y) = self.px(p);
        (x.round() as i32, y.round() as i32)
    }
}

/// A label box in pixels: centre and half sizes.
#[derive(Debug, Clone, Copy)]
struct LabelBox {
    cx: f64,
    cy: f64,
    hw: f64,
    hh: f64,
}

impl LabelBox {
    fn overlaps(&self, o: &LabelBox) -> (f64, f64) {
        ((self.hw + o.hw) - (self.cx - o.cx).abs(), (self.hh + o.hh) - (self.cy - o.cy).abs())
    }

    /// Parameter along `p → q` where the segment leaves this box (p inside).
    fn exit(&self, p: (f64, f64), q: (f64, f64), gap: f64) -> f64 {
        let (dx, dy) = (q.0 - p.0, q.1 - p.1);
        let mut t = f64::INFINITY;
        if dx.abs() > 1e-9 {
            t = t.min(((self.cx + (self.hw + gap) * dx.signum()) - p.0) / dx);
        }
        if dy.abs() > 1e-9 {
            t = t.min(((self.cy + (self.hh + gap) * dy.signum()) - p.1) / dy);
        }
        t.clamp(0.0, 1.0)
    }
}

/// Greedy word wrap to `max_px` using the backend's text measure.
fn wrap<DB: DrawingBackend>(root: &DrawingArea<DB, Shift>, text: &str, style: &TextStyle, max_px: u32) -> Vec<String> {
    let mut lines = Vec::new();
    let mut cur = String::new();
    for word in text.split_whitespace() {
        let trial = if cur.is_empty() { word.to_string() } else { format!("{cur} {word}") };
        let w = root.estimate_text_size(&trial, style).map(|s| s.0).unwrap_or(u32::MAX);
        if w > max_px && !cur.is_empty() {
            lines.push(std::mem::replace(&mut cur, word.to_string()));
        } else {
            cur = trial;
        }
    }
    if !cur.is_empty() {
        lines.push(cur);
    }
    lines
}

/// Nice scale-bar length (1, 2 or 5 × 10ⁿ km) not longer than `max_km`.
pub fn scale_bar_km(max_km: f64) -> f64 {
    if max_km.is_nan() || max_km <= 0.0 || max_km.is_infinite() {
        return 1.0;
    }
    let mag = 10f64.powf(max_km.log10().floor());
    [5.0, 2.0, 1.0].into_iter().map(|m| m * mag).find(|&l| l <= max_km).unwrap_or(mag)
}

impl Figure for ChoroplethMap {
    // Over 100 lines on purpose: the map's layers drawn back to front (polygons, arrows, labels, legend, scale bar, notes) on one drawing area; each layer is short and needs the same projection and pixel frame.
    fn draw<DB: DrawingBackend>(&self, root: &DrawingArea<DB, Shift>) -> Result<(), String> {
        root.fill(&WHITE).map_err(err)?;
        let (w, h) = root.dim_in_pixel();
        let s = h as f64 / 1000.0;
        let sz = |v: f64| (v * s).round().max(1.0);
        let px = |v: f64| (v * s).round() as i32;
        let text = |size: f64, colour: &'static RGBColor, hpos: HPos, vpos: VPos| text_style(sz(size), colour, hpos, vpos);
        let draw_text = |t: &str, at: (i32, i32), style: &TextStyle| root.draw(&Text::new(t.to_string(), at, style.clone())).map_err(err);

        // Titles.
        draw_text(&self.title, (px(30.0), px(22.0)), &text(34.0, &DARK, HPos::Left, VPos::Top))?;
        if !self.subtitle.is_empty() {
            draw_text(&self.subtitle, (px(30.0), px(66.0)), &text(22.0, &GREY, HPos::Left, VPos::Top))?;
        }

        // Layout: map on the left, panel on the right.
        let panel_w = px(430.0);
        let map_rect = (px(30.0), px(110.0), w as i32 - panel_w - px(40.0), h as i32 - px(30.0));
        let panel_x = map_rect.2 + px(30.0);
        let panel_right = w as i32 - px(20.0);
        root.draw(&Rectangle::new([(map_rect.0, map_rect.1), (map_rect.2, map_rect.3)], RGBColor(0xc8, 0xc8, 0xc8).stroke_width(1)))
            .map_err(err)?;
        let view = View::fit(&self.areas, (map_rect.0 + px(10.0), map_rect.1 + px(10.0), map_rect.2 - px(10.0), map_rect.3 - px(10.0)));

        // Areas, outer polygons first so that an area inside another's hole is drawn on top.
        let mut order: Vec<(usize, usize, usize)> = Vec::new();
        for (a, area) in self.areas.iter().enumerate() {
            for (p, poly) in area.polygons.iter().enumerate() {
                let probe = poly.exterior.first().copied().unwrap_or((0.0, 0.0));
                let depth = self
                    .areas
                    .iter()
                    .enumerate()
                    .flat_map(|(b, o)| o.polygons.iter().map(move |q| (b, q)))
                    .filter(|(b, q)| *b != a || !std::ptr::eq(*q, poly))
                    .flat_map(|(_, q)| &q.holes)
                    .filter(|hole| inside_ring(probe, hole))
                    .count();
                order.push((depth, a, p));
            }
        }
        order.sort();
        let ring_px = |ring: &[(f64, f64)]| ring.iter().map(|&p| view.ipx(p)).collect::<Vec<_>>();
        let outline = OUTLINE.stroke_width(px(2.0).max(1) as u32);
        for &(_, a, p) in &order {
            let area = &self.areas[a];
            let poly = &area.polygons[p];
            let fill = self.classes.class_of(area.value).map(|i| self.classes.colours[i]).unwrap_or(NO_VALUE);
            let ext = ring_px(&poly.exterior);
            root.draw(&Polygon::new(ext.clone(), fill.filled())).map_err(err)?;
            for hole in &poly.holes {
                root.draw(&Polygon::new(ring_px(hole), WHITE.filled())).map_err(err)?;
            }
            let mut closed = ext;
            closed.push(closed[0]);
            root.draw(&PathElement::new(closed, outline)).map_err(err)?;
            for hole in &poly.holes {
                let mut c = ring_px(hole);
                c.push(c[0]);
                root.draw(&PathElement::new(c, outline)).map_err(err)?;
            }
        }

        // Label boxes, pushed apart where they overlap.
        let name_style = text(21.0, &DARK, HPos::Center, VPos::Center);
        let value_style = text(21.0, &DARK, HPos::Center, VPos::Center);
        let line_h = sz(25.0);
        let mut boxes: Vec<LabelBox> = Vec::new();
        if self.show_labels {
            for area in &self.areas {
                let (cx, cy) = view.px(area.anchor);
                let wn = root.estimate_text_size(&area.label, &name_style).map(|t| t.0).unwrap_or(100) as f64;
                let wv = root.estimate_text_size(&area.value_text, &value_style).map(|t| t.0).unwrap_or(60) as f64;
                boxes.push(LabelBox { cx, cy, hw: wn.max(wv) / 2.0 + sz(7.0), hh: line_h + sz(4.0) });
            }
            for _ in 0..40 {
                let mut moved = false;
                for i in 0..boxes.len() {
                    for j in i + 1..boxes.len() {
                        let (ox, oy) = boxes[i].overlaps(&boxes[j]);
                        if ox > 0.0 && oy > 0.0 {
                            let d = oy / 2.0 + 1.0;
                            let up = if boxes[i].cy <= boxes[j].cy { -1.0 } else { 1.0 };
                            boxes[i].cy += up * d;
                            boxes[j].cy -= up * d;
                            moved = true;
                        }
                    }
                }
                if !moved {
                    break;
                }
            }
            let (top, bottom) = (map_rect.1 as f64, map_rect.3 as f64);
            for b in &mut boxes {
                b.cy = b.cy.clamp(top + b.hh + 2.0, bottom - b.hh - 2.0);
            }
        }

        // Flow arrows across shared boundaries, off the labels where they can be.
        let arrow_w = px(3.0).max(1) as u32;
        let casing = WHITE.stroke_width(px(8.0).max(2) as u32);
        let draw_arrow = |p: (f64, f64), q: (f64, f64)| -> Result<(), String> {
            let (dx, dy) = (q.0 - p.0, q.1 - p.1);
            let len = (dx * dx + dy * dy).sqrt();
            if len < 1.0 {
                return Ok(());
            }
            let (ux, uy) = (dx / len, dy / len);
            let head = sz(20.0).min(len * 0.6);
            let half = sz(8.0);
            let base = (q.0 - ux * head, q.1 - uy * head);
            let shaft = vec![(p.0.round() as i32, p.1.round() as i32), (base.0.round() as i32, base.1.round() as i32)];
            root.draw(&PathElement::new(shaft.clone(), casing)).map_err(err)?;
            root.draw(&PathElement::new(shaft, FLOW.stroke_width(arrow_w))).map_err(err)?;
            let tri = vec![
                (q.0.round() as i32, q.1.round() as i32),
                ((base.0 - uy * half).round() as i32, (base.1 + ux * half).round() as i32),
                ((base.0 + uy * half).round() as i32, (base.1 - ux * half).round() as i32),
            ];
            root.draw(&Polygon::new(tri, FLOW.filled())).map_err(err)
        };
        if self.show_labels {
            let avoid: Vec<KmBox> = boxes
                .iter()
                .map(|b| {
                    let (lo, hi) = (view.km((b.cx - b.hw, b.cy + b.hh)), view.km((b.cx + b.hw, b.cy - b.hh)));
                    (lo.0, lo.1, hi.0, hi.1)
                })
                .collect();
            let half_km = sz(ARROW_HALF_PX) / view.px_per_km;
            for &(from, to) in &self.arrows {
                let (Some(fa), Some(ta)) = (self.areas.get(from), self.areas.get(to)) else { continue };
                if let Some((tail, head)) = flow_arrow(&fa.polygons, &ta.polygons, half_km, &avoid) {
                    draw_arrow(view.px(tail), view.px(head))?;
                    continue;
                }
                // Areas that neither touch nor come close: label to label.
                let (Some(a), Some(b)) = (boxes.get(from), boxes.get(to)) else { continue };
                let (p, q) = ((a.cx, a.cy), (b.cx, b.cy));
                let t0 = a.exit(p, q, sz(4.0));
                let t1 = 1.0 - b.exit(q, p, sz(4.0));
                if t1 - t0 <= 0.02 {
                    continue;
                }
                let at = |t: f64| (p.0 + (q.0 - p.0) * t, p.1 + (q.1 - p.1) * t);
                draw_arrow(at(t0), at(t1))?;
            }
            // Labels on top.
            for (area, b) in self.areas.iter().zip(&boxes) {
                let r = [
                    ((b.cx - b.hw).round() as i32, (b.cy - b.hh).round() as i32),
                    ((b.cx + b.hw).round() as i32, (b.cy + b.hh).round() as i32),
                ];
                root.draw(&Rectangle::new(r, WHITE.mix(0.82).filled())).map_err(err)?;
                root.draw(&Rectangle::new(r, RGBColor(0x9a, 0x9a, 0x9a).stroke_width(1))).map_err(err)?;
                let (cx, cy) = (b.cx.round() as i32, b.cy.round() as i32);
                draw_text(&area.label, (cx, cy - (line_h / 2.0).round() as i32), &name_style)?;
                draw_text(&area.value_text, (cx, cy + (line_h / 2.0).round() as i32), &value_style)?;
            }
        }

        // Legend panel.
        let head = text(24.0, &DARK, HPos::Left, VPos::Top);
        let body = text(21.0, &DARK, HPos::Left, VPos::Center);
        let small = text(18.0, &GREY, HPos::Left, VPos::Top);
        let panel_w_px = (panel_right - panel_x).max(10) as u32;
        let mut y = map_rect.1;
        for line in wrap(root, &self.legend_title, &head, panel_w_px) {
            draw_text(&line, (panel_x, y), &head)?;
            y += px(30.0);
        }
        y += px(8.0);
        let row = px(36.0);
        let sw = (px(46.0), px(26.0));
        let swatch = |y: i32, fill: RGBColor| -> Result<(), String> {
            let r = [(panel_x, y - sw.1 / 2), (panel_x + sw.0, y + sw.1 / 2)];
            root.draw(&Rectangle::new(r, fill.filled())).map_err(err)?;
            root.draw(&Rectangle::new(r, OUTLINE.stroke_width(1))).map_err(err)
        };
        for i in (0..self.classes.colours.len()).rev() {
            let yc = y + row / 2;
            swatch(yc, self.classes.colours[i])?;
            draw_text(&self.classes.label(i), (panel_x + sw.0 + px(14.0), yc), &body)?;
            y += row;
        }
        if self.areas.iter().any(|a| a.value.is_none()) {
            let yc = y + row / 2;
            swatch(yc, NO_VALUE)?;
            draw_text("no value", (panel_x + sw.0 + px(14.0), yc), &body)?;
            y += row;
        }
        if self.areas.iter().any(|a| a.polygons.iter().any(|p| !p.holes.is_empty())) {
            let yc = y + row / 2;
            swatch(yc, WHITE)?;
            draw_text("excluded (hole in a catchment)", (panel_x + sw.0 + px(14.0), yc), &body)?;
            y += row;
        }
        if self.show_labels && !self.arrows.is_empty() {
            let yc = (y + row / 2) as f64;
            draw_arrow((panel_x as f64, yc), ((panel_x + sw.0) as f64, yc))?;
            draw_text("flows into", (panel_x + sw.0 + px(14.0), yc as i32), &body)?;
            y += row;
        }

        // Scale bar and north arrow.
        y += px(22.0);
        let max_bar_px = (panel_w_px as f64 - sz(90.0)).max(20.0);
        let bar_km = scale_bar_km(max_bar_px / view.px_per_km);
        let bar_px = (bar_km * view.px_per_km).round() as i32;
        let bar_h = px(10.0).max(3);
        let half = bar_px / 2;
        root.draw(&Rectangle::new([(panel_x, y), (panel_x + half, y + bar_h)], DARK.filled())).map_err(err)?;
        root.draw(&Rectangle::new([(panel_x + half, y), (panel_x + bar_px, y + bar_h)], WHITE.filled())).map_err(err)?;
        root.draw(&Rectangle::new([(panel_x, y), (panel_x + bar_px, y + bar_h)], DARK.stroke_width(1))).map_err(err)?;
        let tick = text(19.0, &DARK, HPos::Center, VPos::Top);
        let km = |v: f64| if v.fract() == 0.0 { format!("{v:.0}") } else { format!("{v}") };
        draw_text("0", (panel_x, y + bar_h + px(5.0)), &tick)?;
        draw_text(&km(bar_km / 2.0), (panel_x + half, y + bar_h + px(5.0)), &tick)?;
        draw_text(&format!("{} km", km(bar_km)), (panel_x + bar_px, y + bar_h + px(5.0)), &tick)?;
        // North arrow to the right of the bar.
        let nx = panel_right - px(24.0);
        let ny = y - px(14.0);
        root.draw(&Polygon::new(
            vec![(nx, ny - px(26.0)), (nx - px(10.0), ny + px(6.0)), (nx, ny), (nx + px(10.0), ny + px(6.0))],
            DARK.filled(),
        ))
        .map_err(err)?;
        draw_text("N", (nx, ny + px(10.0)), &text(19.0, &DARK, HPos::Center, VPos::Top))?;
        y += bar_h + px(40.0);

        // Notes.
        y += px(12.0);
        for note in &self.notes {
            for line in wrap(root, note, &small, panel_w_px) {
                draw_text(&line, (panel_x, y), &small)?;
                y += px(23.0);
            }
            y += px(8.0);
        }
        Ok(())
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    #[test]
    fn breaks_are_nice_and_include_zero() {
        let c = Classes::diverging(&[-24.6, -5.7, -2.7, -19.3], 6);
        assert_eq!(c.breaks, vec![-25.0, -20.0, -15.0, -10.0, -5.0, 0.0]);
        assert_eq!(c.class_of(Some(-24.6)), Some(0));
        assert_eq!(c.class_of(Some(-5.0)), Some(3));
        assert_eq!(c.class_of(Some(0.0)), Some(4));
        assert_eq!(c.class_of(Some(-25.0)), Some(0));
        assert_eq!(c.class_of(None), None);
        assert_eq!(c.label(0), "\u{2212}25 to \u{2212}20");
        assert_eq!(c.decimals, 0);
    }

    #[test]
    fn gains_get_their_own_classes() {
        let c = Classes::diverging(&[-3.0, 1.2], 5);
        assert_eq!(c.breaks, vec![-3.0, -2.0, -1.0, 0.0, 1.0, 2.0]);
        assert_eq!(c.class_of(Some(1.2)), Some(4));
        assert_eq!(c.class_of(Some(0.5)), Some(3));
        // Zero belongs to the class just below it ("−1 to 0").
        assert_eq!(c.class_of(Some(0.0)), Some(2));
        assert_eq!(c.class_of(Some(2.0)), Some(4));
        assert_eq!(c.class_of(Some(2.5)), None);
        // Losses warm (red above blue), gains cool (blue above red).
        let (l, g) = (c.colours[0], c.colours[4]);
        assert!(l.0 > l.2 && g.2 > g.0, "{l:?} {g:?}");
    }

    #[test]
    fn ramps_darken_steadily() {
        let lum = |c: RGBColor| 0.2126 * c.0 as f64 + 0.7152 * c.1 as f64 + 0.0722 * c.2 as f64;
        for r in [&LOSS_RAMP[..], &GAIN_RAMP[..]] {
            let l: Vec<f64> = (0..=20).map(|k| lum(ramp(r, k as f64 / 20.0))).collect();
            assert!(l.windows(2).all(|w| w[1] < w[0]), "{l:?}");
        }
    }

    #[test]
    fn nice_numbers() {
        assert_eq!(nice_step(4.1), 5.0);
        assert_eq!(nice_step(0.21), 0.2);
        assert_eq!(nice_step(0.24), 0.25);
        assert_eq!(nice_step(8.0), 10.0);
        assert_eq!(Classes::diverging(&[-2.2], 5).decimals, 1);
        assert_eq!(scale_bar_km(7.3), 5.0);
        assert_eq!(scale_bar_km(1.9), 1.0);
        assert_eq!(map_number(-0.0, 1), "0.0");
        assert_eq!(map_number(-2.5, 1), "\u{2212}2.5");
        // Legends are never grouped: a change against a small baseline can pass 1000 %.
        assert_eq!(Classes { breaks: vec![1000.0, 2000.0], colours: vec![NO_VALUE], decimals: 0 }.label(0), "1000 to 2000");
    }
}
