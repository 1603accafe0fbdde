//! The coverage map: every possible order up to 2000, coloured by its status.
//!
//! A grid of links, 25 to a row so that a row spans 100 orders, each named for screen readers
//! ("668, open"). Colour is never the only signal: open orders also carry a hatch and a ring,
//! and the legend states each status in words with its count.

use crate::lookup::fetch;
use crate::words::status_label;
use hadamard_core::wire::{name_of, CoverageEntry};
use leptos::prelude::*;

/// The largest order on the map.
const MAX: u64 = 2000;
/// Orders per row of the grid (all multiples of 4, so a row spans 4·PER_ROW).
const PER_ROW: u64 = 25;

const STATUSES: [&str; 5] = ["constructible", "known", "open", "uncovered", "impossible"];

/// A comma-separated list of orders, for the text answers.
fn listing(orders: &[u64]) -> String {
    if orders.is_empty() {
        return "none".into();
    }
    orders
        .iter()
        .map(u64::to_string)
        .collect::<Vec<_>>()
        .join(", ")
}

/// The coverage as CSV, for a `data:` download link (the page already holds the list).
fn csv_href(list: &[(u64, String)]) -> String {
    let mut csv = String::from("order,status%0A");
    for (n, s) in list {
        csv.push_str(&format!("{n},{s}%0A"));
    }
    format!("data:text/csv;charset=utf-8,{csv}")
}

#[component]
pub fn Coverage() -> impl IntoView {
    let reply = fetch::<Vec<CoverageEntry>>(format!("/api/coverage?max={MAX}"));
    // The grid is one tab stop: arrow keys move within it (the cell that has it is `active`).
    let active = RwSignal::new(0usize);
    view! {
        <h1 tabindex="-1">"Coverage of the orders up to 2000"</h1>
        <p class="lede">
            "Every multiple of 4 up to 2000, one square each, 100 orders to a row. Choose a square to open that order; "
            "in the map, the arrow keys move between squares and Enter opens one."
        </p>
        <section class="card" aria-live="polite">
            {move || match reply.get() {
                None => view! { <p class="waiting">"Asking the catalogue…"</p> }.into_any(),
                Some(Err(e)) => view! { <p class="bad">{e.message}</p> }.into_any(),
                Some(Ok(entries)) => {
                    let list: Vec<(u64, String)> = entries
                        .iter()
                        .map(|e| (e.order, name_of(&e.status)))
                        .collect();
                    let count = |s: &str| list.iter().filter(|(_, t)| t == s).count();
                    let with = |s: &str| list.iter().filter(|(_, t)| t == s).map(|(n, _)| *n).collect::<Vec<u64>>();
                    let open = with("open");
                    let known = with("known");
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
                    let fours: Vec<(u64, String)> = list.iter().filter(|(n, _)| *n >= 4).cloned().collect();
                    let total = fours.len();
                    let rows: Vec<Vec<(usize, u64, String)>> = fours
                        .iter()
                        .enumerate()
                        .map(|(i, (n, s))| (i, *n, s.clone()))
                        .collect::<Vec<_>>()
                        .chunks(PER_ROW as usize)
                        .map(|c| c.to_vec())
                        .collect();
                    let cell = move |(i, n, s): (usize, u64, String)| {
                        let label = format!("{n}, {}", status_label(&s));
                        view! {
                            <a class=format!("cell st-{s}") href=format!("/orders/{n}") title=label.clone() aria-label=label
                                data-order=n data-idx=i tabindex=move || if active.get() == i { "0" } else { "-1" }></a>
                        }
                    };
                    let on_key = move |ev: web_sys::KeyboardEvent| {
                        let per = PER_ROW as usize;
                        let now = active.get_untracked();
                        if total == 0 {
                            return;
                        }
                        let next = match ev.key().as_str() {
                            "ArrowRight" => (now + 1).min(total - 1),
                            "ArrowLeft" => now.saturating_sub(1),
                            "ArrowDown" => if now + per < total { now + per } else { now },
                            "ArrowUp" => now.checked_sub(per).unwrap_or(now),
                            "Home" => now - now % per,
                            "End" => (now - now % per + per - 1).min(total - 1),
                            _ => return,
                        };
                        ev.prevent_default();
                        active.set(next);
                        if let Some(el) = crate::app::document()
                            .query_selector(&format!("a.cell[data-idx=\"{next}\"]"))
                            .ok()
                            .flatten()
                        {
                            if let Some(el) = wasm_bindgen::JsCast::dyn_ref::<web_sys::HtmlElement>(&el) {
                                let _ = el.focus();
                            }
                        }
                    };
                    let smallest_open = open.first().copied();
                    let json = format!("/api/coverage?max={MAX}");
                    let csv = csv_href(&list);
                    view! {
                        <div class="coverage-text" id="coverage-text">
                            <p class="answer" id="smallest-open">
                                {match smallest_open {
                                    Some(n) => view! { "Smallest open order: "<a href=format!("/orders/{n}")><strong>{n.to_string()}</strong></a>" — no Hadamard matrix of this order is known to anyone." }.into_any(),
                                    None => view! { "No order up to 2000 is open." }.into_any(),
                                }}
                            </p>
                            <p id="open-list"><strong>{format!("Open ({}): ", open.len())}</strong>{listing(&open)}"."</p>
                            <p id="known-list"><strong>{format!("Known in the literature but not yet built here ({}): ", known.len())}</strong>{listing(&known)}"."</p>
                            <p>"The whole list: "
                                <a href=csv download="hadamard-coverage-2000.csv" data-coverage="csv">"CSV"</a>" · "
                                <a href=json data-coverage="json">"JSON"</a>"."</p>
                        </div>
                        <ul class="legend-list" aria-label="Legend">{legend}</ul>
                        <p class="help">{format!("Orders 1 and 2: {}.", small.iter().map(|(n, s)| format!("{n} {}", status_label(s))).collect::<Vec<_>>().join(", "))}</p>
                        <div class="map" role="group" aria-label="Orders by status; arrow keys move, Enter opens" on:keydown=on_key>
                            {rows.into_iter().map(|row| {
                                let first = row.first().map(|(_, n, _)| *n).unwrap_or(0);
                                let last = row.last().map(|(_, n, _)| *n).unwrap_or(0);
                                view! {
                                    <div class="map-row">
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
