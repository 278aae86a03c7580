//! Which catchments have their own pages, and the note on those left out.

use super::*;

/// Most left-out catchments named one by one in the note (the rest are counted).
pub const MAX_NAMED_LEFT_OUT: usize = 40;

/// The catchments without their own pages, in table order.
pub(super) fn left_out(d: &RunData) -> Vec<&(String, String, f64)> {
    d.catchments.iter().filter(|c| !d.detailed.contains(&c.0)).collect()
}

/// A paragraph naming the catchments left out of the per-catchment pages (none
/// when every catchment has its pages) and how to include them all.
pub(super) fn left_out_note(d: &RunData, doc: &mut Doc) {
    let out = left_out(d);
    if out.is_empty() {
        return;
    }
    let shown = d.catchments.len() - out.len();
    let mut t = Text::new().plain(if shown == 0 {
        "No catchment has its own pages in this report".to_string()
    } else {
        format!(
            "Pages follow for the {shown} catchment{} with the largest yield loss at the horizon without control (",
            if shown == 1 { "" } else { "s" }
        )
    });
    if shown > 0 {
        t = t.code(sc::YIELD_CHANGE_HORIZON_PCT).plain(" in ").code(SUMMARY).plain(")");
    }
    t = t.plain(format!("; {} {} left out: ", out.len(), if out.len() == 1 { "is" } else { "are" }));
    for (k, (id, name, _)) in out.iter().take(MAX_NAMED_LEFT_OUT).enumerate() {
        if k > 0 {
            t = t.plain(", ");
        }
        t = t.plain(name.clone()).plain(" (").code(id).plain(")");
    }
    if out.len() > MAX_NAMED_LEFT_OUT {
        t = t.plain(format!(" and {} more", out.len() - MAX_NAMED_LEFT_OUT));
    }
    doc.para(
        t.plain(". Every catchment is in the table above and in ")
            .code(SUMMARY)
            .plain("; for a page for every catchment, write the report again with ")
            .code("yieldshift report DIR --report-catchments all")
            .plain("."),
    );
}
