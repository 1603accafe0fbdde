//! The page of one catalogue entry, `/m/{id}`.
//!
//! The metadata comes from `/api/matrices/{id}`. The picture is drawn from the entry's
//! canonical `pm` download, read by core here; the page also hashes those rows and says whether
//! they match the id, so the link is checked in the reader's own browser.

use crate::api;
use crate::lookup::{fetch, node_view};
use crate::picture::MatrixPicture;
use crate::verify::absolute;
use hadamard_core::formats::{self, Format, ReadOptions};
use hadamard_core::Matrix;
use leptos::prelude::*;
use leptos::task::spawn_local;
use serde_json::Value;
use std::sync::Arc;
use wasm_bindgen_futures::JsFuture;

/// Orders above this are not downloaded for the picture (the server's PNG is shown instead).
const PICTURE_MAX_ORDER: u64 = 4096;

/// Every download, with its conventions in words.
const DOWNLOADS: [(&str, &str, &str); 8] = [
    ("pm", "Plus/minus text (.txt)", "One row per line, + for +1 and - for −1, each row ended by a newline. This is the canonical text: its SHA-256 is the id."),
    ("csv", "CSV (.csv)", "The integers 1 and -1 separated by commas, one row per line."),
    ("bits", "Bits (.txt)", "Rows of the digits 0 and 1, where 1 means −1 and 0 means +1; a first comment line states this mapping."),
    ("json", "JSON (.json)", "An array of rows, each an array of 1 and -1."),
    ("npy", "NumPy, int8 (.npy)", "Entries 1 and -1 as 8-bit integers; not scaled."),
    ("npy-f64", "NumPy, float64 (.npy)", "Entries 1.0 and -1.0; not scaled."),
    ("npy-f64-scaled", "NumPy, float64 scaled (.npy)", "Entries ±1/√n, so H/√n is orthogonal and each row has length 1. Scaled is not normalized: normalized means the first row and column are all +1."),
    ("png", "Picture (.png)", "+1 warm off-white, −1 deep ink blue, one square of pixels per entry, about 512 pixels wide."),
];

/// Every derived object (`/api/matrices/{id}/derive/…`), with what it is, in words.
const DERIVED: [(&str, &str, &str); 12] = [
    ("screening?format=csv&seed={seed}", "Screening design (.csv)", "The two-level orthogonal main-effect design (Plackett–Burman): n runs for n−1 factors, the columns of the normalised matrix after the constant one, in a random run order replayable from the seed. Every pair of columns is orthogonal."),
    ("screening?format=csv&fold-over=true&seed={seed}", "Screening design with fold-over (.csv)", "The same with the n sign-reversed runs appended (2n runs): main effects are then free of two-factor interactions."),
    ("screening?seed={seed}", "Screening design (JSON)", "The design with its factors, levels, seed and computed properties."),
    ("code?variant=full", "Hadamard code, full (JSON)", "The rows of the normalised H and −H as binary words (+1 → 0, −1 → 1): length n, 2n words, minimum distance n/2."),
    ("code?variant=punctured", "Hadamard code, punctured (JSON)", "The same without the constant first column: length n−1, 2n words, minimum distance n/2−1."),
    ("code?variant=shortened", "Hadamard code, shortened (JSON)", "The rows only, without the first column: length n−1, n words, minimum distance n/2."),
    ("symmetric-design?format=csv", "Symmetric 2-design (.csv)", "The incidence matrix of the symmetric 2-(n−1, n/2−1, n/4−1) design: every pair of points lies in exactly n/4−1 blocks."),
    ("sequency", "Sequencies (JSON)", "Each row's number of sign changes, and whether sequency (Walsh) order is defined for this matrix."),
    ("ordering?order=sequency", "Rows in sequency order (.txt)", "Row k has k sign changes. Defined only when the rows' sequencies are distinct (as for Sylvester's matrices); otherwise the answer says why not."),
    ("ordering?order=dyadic", "Rows in dyadic (Paley) order (.txt)", "Defined for Sylvester's matrix: row p is the Walsh function whose index is p with its bits reversed."),
    ("ordering?scaled=true&format=csv", "Scaled by 1/√n (.csv)", "Entries ±1/√n, so the rows are orthonormal; the first line says so. Scaled is not normalised (normalised means a first row and column of +1)."),
    ("ordering?scaled=true&format=npy-f64", "Scaled by 1/√n, NumPy float64 (.npy)", "The same as a float64 .npy file."),
];

fn facts_list(v: &Value) -> Vec<(String, String)> {
    match v.as_object() {
        Some(o) => o
            .iter()
            .map(|(k, val)| (k.replace('_', " "), api::plain(val)))
            .collect(),
        None => match v {
            Value::Null => Vec::new(),
            other => vec![(String::new(), api::plain(other))],
        },
    }
}

fn dl(items: Vec<(String, String)>) -> impl IntoView {
    view! {
        <dl class="facts">
            {items.into_iter().map(|(k, v)| view! { <dt>{k}</dt><dd>{v}</dd> }).collect_view()}
        </dl>
    }
}

/// Where the matrix came from: built by a route (drawn as its tree) or uploaded.
fn provenance_view(p: &Value, catalogue: bool, order: u64) -> AnyView {
    let kind = api::s(p, "kind").unwrap_or("");
    let own = catalogue.then(
        || view! { <p>{format!("This is the catalogue's own matrix of order {order}.")}</p> },
    );
    match kind {
        "constructed" => {
            let at = api::s(p, "constructed_at").unwrap_or("").to_string();
            let tree = p
                .get("recipe")
                .and_then(|r| r.get("tree"))
                .map(|t| node_view(t, order));
            view! {
                {own}
                <p>{format!("Built and checked by this program{}, by this route (its recipe replays to the same matrix):", if at.is_empty() { String::new() } else { format!(" on {at}") })}</p>
                {tree.map(|t| view! { <ul class="tree">{t}</ul> })}
            }
            .into_any()
        }
        "uploaded" => {
            let at = api::s(p, "uploaded_at").unwrap_or("").to_string();
            let f = api::s(p, "received_format").unwrap_or("").to_string();
            view! {
                {own}
                <p>{format!("Uploaded on {at}{}, and checked by the server before it was stored.", if f.is_empty() { String::new() } else { format!(" as {f}") })}</p>
            }
            .into_any()
        }
        _ => view! { {own}{dl(facts_list(p))} }.into_any(),
    }
}

#[component]
pub fn Entry(id: String) -> impl IntoView {
    let meta = fetch(format!("/api/matrices/{id}"));
    let matrix = RwSignal::new(None::<Result<Arc<Matrix>, String>>);
    let copied = RwSignal::new(None::<String>);
    let permalink = absolute(&format!("/m/{id}"));

    // The picture: fetch the canonical text once the order is known to be small enough.
    let fetch_started = StoredValue::new(false);
    let id_pic = id.clone();
    Effect::new(move |_| {
        let Some(Ok(r)) = meta.get() else { return };
        if !r.ok() || fetch_started.get_value() {
            return;
        }
        fetch_started.set_value(true);
        if api::u(&r.body, "order").unwrap_or(0) > PICTURE_MAX_ORDER {
            return;
        }
        let url = format!("/api/matrices/{id_pic}/download?format=pm");
        spawn_local(async move {
            let got = match api::get_bytes(&url).await {
                Ok((200, bytes)) => {
                    let opts = ReadOptions {
                        format: Some(Format::Pm),
                        ..ReadOptions::default()
                    };
                    formats::read(&bytes, &opts)
                        .map(|p| Arc::new(p.matrix))
                        .map_err(|e| format!("the download could not be read: {e}"))
                }
                Ok((status, _)) => Err(format!("the download answered {status}")),
                Err(e) => Err(e),
            };
            matrix.set(Some(got));
        });
    });

    let link_for_copy = permalink.clone();
    let copy = move |_| {
        let url = link_for_copy.clone();
        spawn_local(async move {
            let clip = crate::app::window().navigator().clipboard();
            let ok = JsFuture::from(clip.write_text(&url)).await.is_ok();
            copied.set(Some(if ok {
                "Copied the permanent link.".into()
            } else {
                "Could not copy; select the link above and copy it.".into()
            }));
        });
    };

    let id_view = id.clone();
    let id_check = id.clone();
    let id_dl = id.clone();
    let id_derived = id.clone();
    // A seed for the screening links, taken from the id so the links are stable; editable.
    let seed = RwSignal::new(
        u32::from_str_radix(id.get(..8).unwrap_or("1"), 16)
            .unwrap_or(1)
            .to_string(),
    );
    let strata = RwSignal::new(String::from("10"));
    let other = RwSignal::new(String::new());
    view! {
        <h1 tabindex="-1">"A Hadamard matrix"</h1>
        <section class="card">
            <p class="label">"Permanent link"</p>
            <div class="permalink">
                <input type="text" readonly aria-label="Permanent link" prop:value=permalink.clone() id="permalink-text"
                    on:focus=move |ev| { let i: web_sys::HtmlInputElement = event_target(&ev); i.select(); } />
                <button type="button" class="primary" on:click=copy id="copy-link">"Copy link"</button>
            </div>
            <p class="help" aria-live="polite">{move || copied.get()}</p>
            <p class="label">"Id (SHA-256 of the canonical text)"</p>
            <p><code class="id" id="entry-id">{id_view}</code></p>
        </section>
        {move || match meta.get() {
            None => view! { <p class="waiting">"Loading…"</p> }.into_any(),
            Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
            Some(Ok(r)) if r.status == 404 => view! {
                <section class="card"><p class="bad">"No matrix with this id is in the catalogue."</p>
                <p>"Ids are SHA-256 hashes of the canonical text, so a mistyped link matches nothing. "<a href="/verify">"Verify and publish a matrix"</a>" to create one."</p></section>
            }.into_any(),
            Some(Ok(r)) if !r.ok() => view! { <p class="bad">{r.error()}</p> }.into_any(),
            Some(Ok(r)) => {
                let b = r.body;
                let order = api::u(&b, "order").unwrap_or(0);
                let props = b.get("properties").cloned().unwrap_or(Value::Null);
                let prop_items: Vec<(String, String)> = ["normalized", "symmetric", "skew", "regular"]
                    .into_iter()
                    .map(|k| (k.to_string(), match api::b(&props, k) { Some(true) => "yes".into(), Some(false) => "no".into(), None => "—".into() }))
                    .chain(props.get("excess").map(|e| ("excess".to_string(), api::plain(e))))
                    .collect();
                let prov = b.get("provenance").cloned().unwrap_or(Value::Null);
                let provenance = provenance_view(&prov, b.get("catalogue_entry").is_some_and(|e| !e.is_null()), order);
                let invariant = b.get("invariant").and_then(|i| api::s(i, "kind")).map(|k| k.replace('_', " "));
                let verification = b.get("verification").cloned().unwrap_or(Value::Null);
                let order_link = format!("/orders/{order}");
                let big = order > PICTURE_MAX_ORDER;
                let png = format!("/api/matrices/{}/download?format=png", id_check);
                view! {
                    <section class="card" aria-labelledby="about-title">
                        <h2 id="about-title">{format!("Order {order}")}</h2>
                        <p>"See "<a href=order_link>{format!("everything about order {order}")}</a>"."</p>
                        <h3>"Properties"</h3>
                        {dl(prop_items)}
                        {invariant.map(|k| view! { <p class="help">{format!("Its invariant for telling matrices apart: the {k}, stored with it.")}</p> })}
                        <h3>"Provenance"</h3>
                        {provenance}
                        <h3>"Verification record"</h3>
                        {dl(facts_list(&verification))}
                    </section>
                    <section class="card" aria-labelledby="picture-title">
                        <h2 id="picture-title">"Picture"</h2>
                        {if big {
                            view! { <img class="png" src=png alt=format!("Picture of the matrix of order {order}") /> }.into_any()
                        } else {
                            let id_check = id_check.clone();
                            (move || match matrix.get() {
                                None => view! { <p class="waiting">"Drawing…"</p> }.into_any(),
                                Some(Err(e)) => view! { <p class="bad">{e}</p> }.into_any(),
                                Some(Ok(m)) => {
                                    let matches = hadamard_core::id::matrix_id(&m) == id_check;
                                    view! {
                                        <MatrixPicture matrix=m label=format!("Picture of the matrix of order {order}: light squares are +1, dark squares −1.") />
                                        <p class=if matches { "good" } else { "bad" } id="id-check">
                                            {if matches { "Checked in your browser: the downloaded rows hash to this id." } else { "Warning: the downloaded rows do not hash to this id." }}
                                        </p>
                                    }.into_any()
                                }
                            }).into_any()
                        }}
                    </section>
                }.into_any()
            }
        }}
        <section class="card" aria-labelledby="downloads-title">
            <h2 id="downloads-title">"Downloads"</h2>
            <ul class="downloads">
                {DOWNLOADS.iter().map(|(f, name, conv)| {
                    let href = format!("/api/matrices/{id_dl}/download?format={f}");
                    view! {
                        <li>
                            <a href=href download="" data-format=*f>{*name}</a>
                            <span class="conv">{*conv}</span>
                        </li>
                    }
                }).collect_view()}
            </ul>
        </section>
        <section class="card" aria-labelledby="derived-title">
            <h2 id="derived-title">"Made from this matrix"</h2>
            <p class="help">"Each object states the property that defines it, computed on what was built, and its published source. Rows, columns and points count from 0."</p>
            <p>
                <label for="derived-seed">"Seed for the run order "</label>
                <input id="derived-seed" type="number" min="0" prop:value=move || seed.get()
                    on:input=move |ev| seed.set(event_target_value(&ev)) />
            </p>
            <ul class="downloads" id="derived">
                {DERIVED.iter().map(|(q, name, conv)| {
                    let id = id_derived.clone();
                    let q = *q;
                    let href = move || format!("/api/matrices/{id}/derive/{}", q.replace("{seed}", seed.get().trim()));
                    view! {
                        <li>
                            <a href=href download="" data-derived=q.split('?').next().unwrap_or(q)>{*name}</a>
                            <span class="conv">{*conv}</span>
                        </li>
                    }
                }).collect_view()}
                {
                    let id = id_derived.clone();
                    let href = move || format!("/api/matrices/{id}/derive/brr?format=csv&strata={}", strata.get().trim());
                    view! {
                        <li>
                            <span>
                                <a href=href download="" data-derived="brr">"Balanced repeated replication (.csv)"</a>
                                " for "
                                <input type="number" min="1" aria-label="Number of strata" class="narrow" prop:value=move || strata.get()
                                    on:input=move |ev| strata.set(event_target_value(&ev)) />
                                " strata"
                            </span>
                            <span class="conv">"A replicate per row, a ±1 sign per stratum: stratum h takes row h of the normalised matrix (the constant row is left out), +1 keeps its first PSU. Needs fewer strata than the order; for k strata the smallest order to use is the smallest known order above k ("<a href="/api/brr?strata=10">"/api/brr?strata=k"</a>")."</span>
                        </li>
                    }
                }
                {
                    let id = id_derived.clone();
                    let href = move || format!("/api/equivalence?a={id}&b={}", other.get().trim());
                    view! {
                        <li>
                            <span>
                                <a href=href data-derived="equivalence">"Equivalence with"</a>" "
                                <input type="text" aria-label="The other matrix's id" placeholder="another matrix's id" prop:value=move || other.get()
                                    on:input=move |ev| other.set(event_target_value(&ev)) />
                            </span>
                            <span class="conv">"Whether another stored matrix of the same order is equivalent (rows and columns permuted and negated): a checked certificate, an invariant that differs, or “undecided”."</span>
                        </li>
                    }
                }
            </ul>
        </section>
    }
}
