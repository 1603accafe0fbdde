//! The coverage map: every possible order up to 2000, coloured by its status.
//!
//! A grid of links, 25 to a row so that a row spans 100 orders, each named for screen readers
//! ("668, open"). Colour is never the only signal: open orders also carry a hatch and a ring,
//! and the legend states each status in words with its count.

use crate::api;
use crate::lookup::fetch;
use crate::words::status_label;
use leptos::prelude::*;

/// The largest order on the map.
const MAX: u64 = 2000;
/// Orders per row of the grid (all multiples of 4, so a row spans 4·PER_ROW).
const PER_ROW: u64 = 25;

const STATUSES: [&str; 5] = ["constructible", "known", "open", "uncovered", "impossible"];

#[component]
pub fn Coverage() -> impl IntoView {
    let reply = fetch(format!("/api/coverage?max={MAX}"));
    view! {
        <h1 tabindex="-1">"Coverage of the orders up to 2000"</h1>
        <p class="lede">
            "Every multiple of 4 up to 2000, one square each, 100 orders to a row. Choose a square to open that order."
        </p>
        <section class="card" aria-live="polite">
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                Some(Ok(r)) if !r.ok() => view! { <p class="bad">{r.error()}</p> }.into_any(),
                Some(Ok(r)) => {
                    let list: Vec<(u64, String)> = match &r.body {
                        serde_json::Value::Array(a) => a.clone(),
                        b => api::arr(b, "orders").to_vec(),
                    }
                    .iter()
                    .filter_map(|e| Some((api::u(e, "order")?, api::s(e, "status")?.to_string())))
                    .collect();
                    let count = |s: &str| list.iter().filter(|(_, t)| t == s).count();
                    let legend = STATUSES
                        .iter()
                        .filter(|s| count(s) > 0)
                        .map(|s| {
                            let c = count(s);
                            view! {
                                <li><i class=format!("cell st-{s}") aria-hidden="true"></i>
                                    <strong>{status_label(s)}</strong>{format!(" — {c} order{}", if c == 1 { "" } else { "s" })}
                                </li>
                            }
                        })
                        .collect_view();
                    let small: Vec<(u64, String)> = list.iter().filter(|(n, _)| *n < 4).cloned().collect();
                    let rows: Vec<Vec<(u64, String)>> = {
                        let fours: Vec<(u64, String)> = list.iter().filter(|(n, _)| *n >= 4).cloned().collect();
                        fours.chunks(PER_ROW as usize).map(|c| c.to_vec()).collect()
                    };
                    let cell = |(n, s): (u64, String)| {
                        let label = format!("{n}, {}", status_label(&s));
                        view! { <a class=format!("cell st-{s}") href=format!("/orders/{n}") title=label.clone() aria-label=label data-order=n></a> }
                    };
                    view! {
                        <ul class="legend-list" aria-label="Legend">{legend}</ul>
                        <p class="help">{format!("Orders 1 and 2: {}.", small.iter().map(|(n, s)| format!("{n} {}", status_label(s))).collect::<Vec<_>>().join(", "))}</p>
                        <div class="map" role="list" aria-label="Orders by status">
                            {rows.into_iter().map(|row| {
                                let first = row.first().map(|(n, _)| *n).unwrap_or(0);
                                let last = row.last().map(|(n, _)| *n).unwrap_or(0);
                                view! {
                                    <div class="map-row" role="listitem">
                                        <span class="map-label">{format!("{first}–{last}")}</span>
                                        <span class="map-cells">{row.into_iter().map(cell).collect_view()}</span>
                                    </div>
                                }
                            }).collect_view()}
                        </div>
                    }.into_any()
                }
            }}
        </section>
    }
}
