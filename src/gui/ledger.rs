//! The ledger: the per-stop table (the mission crate's event table, built from the very
//! evaluation the views draw), the totals line and the warnings. Its column header stays in place
//! while the rows scroll; the panel's height is the user's (kept in the settings).

use eframe::egui::{self, RichText};
use egui_extras::{Column, TableBuilder};
use tourwright_mission::report::{self, Cell, EVENT_COLUMNS, LEDGER_VIEW_COLUMNS};
use tourwright_mission::rules;

use super::action::{Action, Actions};
use super::context::ViewCtx;
use super::style;

/// Warnings listed in full above the table; more are counted, and listed on hover.
const WARNINGS_SHOWN: usize = 2;

/// The ledger panel.
#[derive(Default)]
pub struct LedgerPanel;

impl LedgerPanel {
    /// Draw the ledger.
    pub fn ui(&mut self, ui: &mut egui::Ui, vc: &ViewCtx<'_>) -> Actions {
        let mut out = Vec::new();
        heading(ui, vc, &mut out);
        warnings(ui, vc);
        table(ui, vc, &mut out);
        out
    }
}

fn heading(ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
    ui.horizontal(|ui| {
        ui.heading("Ledger");
        if ui
            .button("Copy table")
            .on_hover_text("Copy the table as tab-separated text")
            .clicked()
        {
            out.push(Action::Copy(vc.events.to_tsv()));
            out.push(Action::Status(
                "ledger copied to the clipboard".into(),
                false,
            ));
        }
        if let Some(t) = vc.tour {
            ui.add(egui::Label::new(report::summary_line(t, vc.eval)).truncate());
        }
    });
}

fn warnings(ui: &mut egui::Ui, vc: &ViewCtx<'_>) {
    let w = &vc.eval.warnings;
    let color = style::warn_color(vc.dark);
    for x in w.iter().take(WARNINGS_SHOWN) {
        ui.add(
            egui::Label::new(RichText::new(format!("! {x}")).color(color))
                .truncate()
                .sense(egui::Sense::hover()),
        )
        .on_hover_text(x.to_string());
    }
    if w.len() > WARNINGS_SHOWN {
        let all: Vec<String> = w.iter().map(|x| format!("! {x}")).collect();
        ui.label(
            RichText::new(format!("and {} more warnings", w.len() - WARNINGS_SHOWN)).color(color),
        )
        .on_hover_text(all.join("\n"));
    }
}

fn table(ui: &mut egui::Ui, vc: &ViewCtx<'_>, out: &mut Actions) {
    let row_h = ui.text_style_height(&egui::TextStyle::Body) + 4.0;
    let faint = ui.visuals().weak_text_color();
    egui::ScrollArea::horizontal()
        .id_salt("ledger-h")
        .show(ui, |ui| {
            // The rows scroll inside whatever height the panel has (the table's own default
            // minimum of 200 points pushed a short ledger's heading off the window).
            let h = ui.available_height();
            let mut t = TableBuilder::new(ui)
                .id_salt("ledger-table")
                .striped(true)
                .resizable(false)
                .min_scrolled_height(0.0)
                .max_scroll_height((h - row_h).max(row_h))
                .auto_shrink([false, true])
                .cell_layout(egui::Layout::left_to_right(egui::Align::Center));
            for (i, _) in LEDGER_VIEW_COLUMNS.iter().enumerate() {
                t = t.column(if i == 0 {
                    Column::auto().at_least(24.0)
                } else {
                    Column::auto().at_least(48.0)
                });
            }
            t.header(row_h, |mut h| {
                for &c in &LEDGER_VIEW_COLUMNS {
                    h.col(|ui| {
                        ui.label(RichText::new(EVENT_COLUMNS[c].header).strong());
                    });
                }
            })
            .body(|mut body| {
                // One row per stop and one per deep-space manoeuvre (which has no number).
                for row in vc.events.rows.iter() {
                    body.row(row_h, |mut r| {
                        let unreached = report::is_unreached_row(row);
                        for &c in &LEDGER_VIEW_COLUMNS {
                            r.col(|ui| cell(ui, vc, row, c, unreached, faint, out));
                        }
                    });
                }
            });
        });
}

fn cell(
    ui: &mut egui::Ui,
    vc: &ViewCtx<'_>,
    row: &[Cell],
    c: usize,
    unreached: bool,
    faint: egui::Color32,
    out: &mut Actions,
) {
    let stop_no = row[0].num().map(|x| x as usize);
    let k = stop_no.map(|n| n.saturating_sub(1)).unwrap_or(usize::MAX);
    let col = EVENT_COLUMNS[c];
    let text = row[c].display(col.decimals);
    let plain = |t: String| {
        let r = RichText::new(t);
        if unreached { r.color(faint) } else { r }
    };
    match col.key {
        "stop" if stop_no.is_none() => {}
        "stop" => {
            if ui.selectable_label(vc.selected == k, text).clicked() {
                out.push(Action::Select(k));
            }
        }
        "kind" if unreached => {
            ui.label(RichText::new(text).color(style::error_color(vc.dark)))
                .on_hover_text(
                    "An earlier shaped swing-by misses its next body: the spacecraft never gets \
                     here, so this row has no flight figures. Retarget that swing-by.",
                );
        }
        "kind" if report::is_dsm_row(row) => {
            ui.label(plain(text).italics());
        }
        "body" => {
            let t = RichText::new(&text);
            ui.label(if unreached {
                t.color(faint)
            } else {
                t.color(style::body_color(&text))
            });
        }
        "periapsis_altitude_km" => {
            let low = vc
                .eval
                .stops
                .get(k)
                .and_then(|s| s.swingby)
                .and_then(|w| w.altitude_km.map(|a| (a, w.min_altitude_km)))
                .is_some_and(|(a, m)| rules::below_minimum(a, m));
            ui.label(if low && !unreached {
                RichText::new(text).color(style::error_color(vc.dark))
            } else {
                plain(text)
            });
        }
        "epoch_utc" => {
            ui.label(plain(text.get(..10).unwrap_or(&text).to_string()));
        }
        _ => {
            ui.label(plain(text));
        }
    }
}
