//! The project's colour palette: chosen for distinct lightness as well as hue, so
//! series stay apart for readers with colour-vision deficiency and in greyscale print.

use plotters::style::RGBColor;

/// Projected water yield (deep blue).
pub const YIELD: RGBColor = RGBColor(0x1d, 0x4e, 0x89);
/// Baseline: starting cover held fixed (mid grey).
pub const BASELINE: RGBColor = RGBColor(0x6e, 0x6e, 0x6e);
/// No invasion at all (sea green).
pub const UNINVADED: RGBColor = RGBColor(0x2f, 0x9c, 0x86);
/// Scattered infestation (pale sand).
pub const SCATTERED: RGBColor = RGBColor(0xe8, 0xc5, 0x6b);
/// Medium-density infestation (burnt orange).
pub const MEDIUM: RGBColor = RGBColor(0xc4, 0x6a, 0x25);
/// Dense infestation (dark pine).
pub const DENSE: RGBColor = RGBColor(0x2e, 0x47, 0x33);
/// Guideline lines (brick red).
pub const GUIDELINE: RGBColor = RGBColor(0xb0, 0x2e, 0x26);
/// Basin-wide (all catchments pooled) values, where catchments are drawn in [`YIELD`] (charcoal).
pub const BASIN: RGBColor = RGBColor(0x3a, 0x3a, 0x3a);
/// Uncertainty ranges: whiskers and band edges (near black).
pub const RANGE: RGBColor = RGBColor(0x22, 0x22, 0x22);
/// Positive influence in sensitivity figures (the first series colour, deep blue).
pub const POSITIVE: RGBColor = SERIES[0];
/// Negative influence in sensitivity figures (the second series colour, amber).
pub const NEGATIVE: RGBColor = SERIES[1];
/// Series colours for contaminants, strategies and catchments, in order.
pub const SERIES: [RGBColor; 6] = [
    RGBColor(0x1d, 0x4e, 0x89),
    RGBColor(0xd9, 0x8c, 0x1f),
    RGBColor(0x8a, 0x3b, 0x6f),
    RGBColor(0x2f, 0x9c, 0x86),
    RGBColor(0x55, 0x55, 0x55),
    RGBColor(0x9c, 0xbf, 0xe0),
];

/// The `i`-th series colour (cycling).
pub fn series(i: usize) -> RGBColor {
    SERIES[i % SERIES.len()]
}
