//! The page of one catalogue entry, `/m/{id}`.
//!
//! The metadata comes from `/api/matrices/{id}`. The picture is drawn from the entry's
//! canonical `pm` download, read by core here; the page also hashes those rows and says whether
//! they match the id, so the link is checked in the reader's own browser (on request above
//! order 1024). An unknown id gets a not-found page with no downloads; derived objects that
//! cannot exist for the matrix are greyed out with the reason; equivalence is answered on the
//! page; and a "Cite this" block gives the id, link, order, how it was made and the date.

use crate::api::{self, Answer};
use crate::lookup::{fetch, node_view};
use crate::picture::MatrixPicture;
use crate::verify::absolute;
use hadamard_core::derive::equivalence::Verdict;
use hadamard_core::formats::{self, Format, ReadOptions};
use hadamard_core::wire::{name_of, EquivalenceAnswer, MatrixInfo, Provenance, SequencyAnswer};
use hadamard_core::Matrix;
use leptos::prelude::*;
use leptos::task::spawn_local;
use std::sync::Arc;
use wasm_bindgen_futures::JsFuture;

/// Up to this order the page downloads the canonical text (about 1 MB at most) to draw the
/// picture and check the id; above it the server's PNG is shown and the check is on request,
/// so a visit does not download 12.8 MB unasked (order 3584).
const PICTURE_AUTO_ORDER: u64 = 1024;

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

fn dl(items: Vec<(String, String)>) -> impl IntoView {
    view! {
        <dl class="facts">
            {items.into_iter().map(|(k, v)| view! { <dt>{k}</dt><dd>{v}</dd> }).collect_view()}
        </dl>
    }
}

/// Where the matrix came from: built by a route (drawn as its tree) or uploaded.
fn provenance_view(p: &Provenance, catalogue: bool, order: u64) -> AnyView {
    let own = catalogue.then(
        || view! { <p>{format!("This is the catalogue's own matrix of order {order}.")}</p> },
    );
    match p {
        Provenance::Constructed { constructed_at, .. } => {
            let at = constructed_at.clone();
            let tree = p.recipe().map(|r| node_view(&r.tree, order));
            view! {
                {own}
                <p>{format!("Built and checked by this program{}, by this route (its recipe replays to the same matrix):", if at.is_empty() { String::new() } else { format!(" on {at}") })}</p>
                {tree.map(|t| view! { <ul class="tree">{t}</ul> })}
            }
            .into_any()
        }
        Provenance::Uploaded {
            uploaded_at,
            received_format,
        } => {
            let at = uploaded_at.clone();
            let f = received_format.clone().unwrap_or_default();
            view! {
                {own}
                <p>{format!("Uploaded on {at}{}, and checked by the server before it was stored.", if f.is_empty() { String::new() } else { format!(" as {f}") })}</p>
            }
            .into_any()
        }
    }
}

/// Words for a derived object that cannot exist for this matrix, or `None` when it can.
fn unavailable(q: &str, order: u64, sequency: &Option<Answer<SequencyAnswer>>) -> Option<String> {
    let kind = q.split('?').next().unwrap_or(q);
    if order > 2048 && matches!(kind, "screening" | "code" | "symmetric-design") {
        return Some(format!("Served up to order 2048; this matrix has order {order}. The command line makes it: hadamard derive {kind}."));
    }
    if kind == "symmetric-design" && order < 8 {
        return Some("Needs order 8 or more (a 2-(n−1, n/2−1, n/4−1) design with at least one block per pair).".into());
    }
    if !q.contains("order=sequency") && !q.contains("order=dyadic") {
        return None;
    }
    let distinct = match sequency {
        Some(Ok(v)) => Some(v.distinct),
        _ => None,
    };
    if q.contains("order=dyadic") && !order.is_power_of_two() {
        return Some(format!("Defined only for Sylvester's matrices, whose orders are powers of two; {order} is not one."));
    }
    match distinct {
        Some(false) if q.contains("order=dyadic") => Some("Defined only for Sylvester's matrix up to row order and signs; this matrix's rows do not have distinct sequencies, so it is not one.".into()),
        Some(false) => Some("Not defined for this matrix: some of its rows have the same number of sign changes (see the sequencies).".into()),
        _ => None,
    }
}

/// The answer of `/api/equivalence`, as sentences.
#[component]
pub fn EquivalenceResult(a: String, b: String) -> impl IntoView {
    let reply = fetch::<EquivalenceAnswer>(format!("/api/equivalence?a={a}&b={b}"));
    let short = format!("{}…", &b[..b.len().min(12)]);
    let link = format!("/m/{b}");
    view! {
        <div class="equivalence" aria-live="polite">
            {move || {
                let (short, link) = (short.clone(), link.clone());
                match reply.get() {
                    None => view! { <p class="waiting">{format!("Comparing with {short}…")}</p> }.into_any(),
                    Some(Err(e)) if e.status == 0 => view! { <p class="bad">{e.message}</p> }.into_any(),
                    Some(Err(e)) => view! { <p class="bad" data-verdict="error">{e.message}</p> }.into_any(),
                    Some(Ok(v)) => {
                        let verdict = name_of(&v.verdict);
                        let nodes = v.nodes;
                        let words = match v.verdict {
                            Verdict::Equivalent => "Equivalent: a certificate (a permutation and negation of rows and of columns) maps one onto the other, and was checked entry by entry.".to_string(),
                            Verdict::Inequivalent => {
                                let name = v.invariant.as_ref().map_or("an invariant", |i| i.name.as_str()).replace('_', " ");
                                format!("Not equivalent: their {name} differs, and equivalent matrices share it.")
                            }
                            Verdict::Undecided => format!("Undecided: the search stopped after {nodes} nodes without a certificate, and the invariants compared agree."),
                        };
                        view! {
                            <p class=if verdict == "equivalent" { "good" } else { "" } data-verdict=verdict.clone()>
                                "With "<a class="id" href=link>{short}</a>": "{words}
                            </p>
                        }.into_any()
                    }
                }
            }}
        </div>
    }
}

/// How the matrix was made, in a few words, for the citation.
fn made_by(prov: &Provenance) -> String {
    match prov {
        Provenance::Constructed { .. } => {
            let method = prov
                .recipe()
                .map(|r| crate::words::method_name(&name_of(&r.tree.method)))
                .unwrap_or_else(|| "a construction".into());
            format!("built by {method} and checked exactly by the Hadamard Registry")
        }
        Provenance::Uploaded { .. } => {
            "uploaded, and checked exactly by the Hadamard Registry".into()
        }
    }
}

fn date_of(prov: &Provenance) -> String {
    let t = prov.at();
    t.get(..10).unwrap_or(t).to_string()
}

#[component]
pub fn Entry(id: String) -> impl IntoView {
    let meta = fetch::<MatrixInfo>(format!("/api/matrices/{id}"));
    let heading = move || match meta.get() {
        Some(Ok(m)) => format!("A Hadamard matrix of order {}", m.order),
        Some(Err(e)) if e.status == 404 => "No such matrix".to_string(),
        _ => "A Hadamard matrix".to_string(),
    };
    view! {
        <h1 tabindex="-1" id="entry-title">{heading}</h1>
        {move || match meta.get() {
            None => view! { <p class="waiting">"Loading…"</p> }.into_any(),
            Some(Err(e)) if e.status == 404 => view! {
                <section class="card" id="not-found">
                    <p class="bad">"No matrix with this id is in the catalogue."</p>
                    <p><code class="id">{id.clone()}</code></p>
                    <p>"Ids are SHA-256 hashes of the canonical text, so a mistyped or shortened link matches nothing. Type its first digits into "
                    <a href="/">"the look-up box"</a>" to find it, or "<a href="/verify">"verify and publish a matrix"</a>" to create one."</p>
                </section>
            }.into_any(),
            Some(Err(e)) => view! { <p class="bad">{e.message}</p> }.into_any(),
            Some(Ok(m)) => view! { <EntryBody id=id.clone() body=m /> }.into_any(),
        }}
    }
}

#[component]
fn EntryBody(id: String, body: MatrixInfo) -> impl IntoView {
    let b = body;
    let order = b.order;
    let matrix = RwSignal::new(None::<Result<Arc<Matrix>, String>>);
    let copied = RwSignal::new(None::<String>);
    let permalink = absolute(&format!("/m/{id}"));

    // The picture and the id check: the canonical text, fetched at once when it is small, and
    // on request when it is large (it is n² + n bytes).
    let fetch_pm = {
        let id = id.clone();
        move || {
            let url = format!("/api/matrices/{id}/download?format=pm");
            matrix.set(Some(Err("…".into())));
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
        }
    };
    let auto = order <= PICTURE_AUTO_ORDER;
    if auto {
        fetch_pm();
    }
    let sequency = RwSignal::new(None::<Answer<SequencyAnswer>>);
    if order <= 2048 {
        let url = format!("/api/matrices/{id}/derive/sequency");
        spawn_local(async move {
            sequency.set(Some(api::get::<SequencyAnswer>(&url).await));
        });
    }

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

    // A seed for the screening links, taken from the id so the links are stable; editable.
    let seed = RwSignal::new(
        u32::from_str_radix(id.get(..8).unwrap_or("1"), 16)
            .unwrap_or(1)
            .to_string(),
    );
    let strata = RwSignal::new(String::from("10"));
    let other = RwSignal::new(String::new());
    let compare = RwSignal::new(None::<String>);

    let yes_no = |on: Option<bool>| match on {
        Some(true) => "yes".to_string(),
        Some(false) => "no".to_string(),
        None => "—".to_string(),
    };
    let p = b.properties.as_ref();
    let prop_items: Vec<(String, String)> = vec![
        ("normalized".into(), yes_no(p.map(|p| p.normalized))),
        ("symmetric".into(), yes_no(p.map(|p| p.symmetric))),
        ("skew".into(), yes_no(p.map(|p| p.skew))),
        ("regular".into(), yes_no(p.map(|p| p.regular))),
    ]
    .into_iter()
    .chain(p.map(|p| ("excess".to_string(), p.excess.to_string())))
    .collect();
    let prov = b.provenance.clone();
    let provenance = provenance_view(&prov, b.catalogue_entry.is_some(), order);
    let invariant = b.invariant.as_ref().map(|i| i.kind.replace('_', " "));
    let v = &b.verification;
    let verification = vec![
        ("check".to_string(), v.check.clone()),
        ("check version".to_string(), v.check_version.to_string()),
        ("kernel".to_string(), v.kernel.clone()),
        ("verified at".to_string(), v.verified_at.clone()),
    ];
    let order_link = format!("/orders/{order}");
    let png = format!("/api/matrices/{id}/download?format=png");
    let cite = format!(
        "Hadamard Registry. A Hadamard matrix of order {order}, id {id}, {}, {}. {permalink}",
        made_by(&prov),
        date_of(&prov)
    );
    let id_check = id.clone();
    let id_dl = id.clone();
    let id_derived = id.clone();
    let id_eq = id.clone();
    let fetch_pm_button = fetch_pm.clone();
    view! {
        <section class="card">
            <p class="label">"Permanent link"</p>
            <div class="permalink">
                <input type="text" readonly aria-label="Permanent link" prop:value=permalink.clone() id="permalink-text"
                    on:focus=move |ev| { let i: web_sys::HtmlInputElement = event_target(&ev); i.select(); } />
                <button type="button" class="primary" on:click=copy id="copy-link">"Copy link"</button>
            </div>
            <p class="help" aria-live="polite">{move || copied.get()}</p>
            <p class="label">"Id (SHA-256 of the canonical text)"</p>
            <p><code class="id" id="entry-id">{id.clone()}</code></p>
        </section>
        <section class="card" aria-labelledby="about-title">
            <h2 id="about-title">{format!("Order {order}")}</h2>
            <p>"See "<a href=order_link>{format!("everything about order {order}")}</a>"."</p>
            <h3>"Properties"</h3>
            {dl(prop_items)}
            {invariant.map(|k| view! { <p class="help">{format!("Its invariant for telling matrices apart: the {k}, stored with it.")}</p> })}
            <h3>"Provenance"</h3>
            {provenance}
            <h3>"Verification record"</h3>
            {dl(verification)}
        </section>
        <section class="card" aria-labelledby="cite-title">
            <h2 id="cite-title">"Cite this"</h2>
            <p class="cite" id="cite-text">{cite}</p>
            <p class="help">"The id is the SHA-256 of the matrix's rows written as + and −, each followed by a newline: anyone holding the file can check the citation with "<code>"sha256sum"</code>"."</p>
        </section>
        <section class="card" aria-labelledby="picture-title">
            <h2 id="picture-title">"Picture"</h2>
            {move || match matrix.get() {
                None => {
                    let go = fetch_pm_button.clone();
                    let mb = (order * (order + 1)) as f64 / 1e6;
                    view! {
                        <img class="png" src=png.clone() alt=format!("Picture of the matrix of order {order}") />
                        <p class="help">{format!("The picture is drawn by the server. The server checked this matrix exactly when it was stored and checks it again before serving it. To check here that its rows hash to the id, this page must download the whole canonical text ({mb:.1} MB).")}</p>
                        <button type="button" id="check-here" on:click=move |_| go()>{format!("Download {mb:.1} MB and check the id here")}</button>
                    }.into_any()
                }
                Some(Err(e)) if e == "…" => view! { <p class="waiting">"Downloading and drawing…"</p> }.into_any(),
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
            }}
        </section>
        <section class="card" aria-labelledby="downloads-title">
            <h2 id="downloads-title">"Downloads"</h2>
            <p class="help">{format!("Each file is named hadamard-{order}-{}-<format>, so the formats never overwrite each other.", &id[..12])}</p>
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
            <p class="help">"Each object states the property that defines it, computed on what was built, and its published source. Rows, columns and points count from 0. Objects that cannot exist for this matrix are greyed out with the reason."</p>
            <p>
                <label for="derived-seed">"Seed for the run order "</label>
                <input id="derived-seed" type="number" min="0" prop:value=move || seed.get()
                    on:input=move |ev| seed.set(event_target_value(&ev)) />
            </p>
            <ul class="downloads" id="derived">
                {DERIVED.iter().map(|(q, name, conv)| {
                    let id = id_derived.clone();
                    let q = *q;
                    let kind = q.split('?').next().unwrap_or(q);
                    let href = move || format!("/api/matrices/{id}/derive/{}", q.replace("{seed}", seed.get().trim()));
                    view! {
                        <li>
                            {move || match unavailable(q, order, &sequency.get()) {
                                None => view! { <a href=href.clone() download="" data-derived=kind>{*name}</a> }.into_any(),
                                Some(why) => view! {
                                    <span class="unavailable" aria-disabled="true" data-derived=kind data-unavailable="true">{*name}</span>
                                    <span class="why">{why}</span>
                                }.into_any(),
                            }}
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
                            <span class="conv">"A replicate per row, a ±1 sign per stratum: stratum h takes row h of the normalised matrix (the constant row is left out), +1 keeps its first PSU. Needs fewer strata than the order; for k strata the smallest order to use is the smallest known order above k ("<a href="/?strata=10">"look up k strata"</a>")."</span>
                        </li>
                    }
                }
                <li id="equivalence-tool">
                    <form class="inline" on:submit=move |ev: web_sys::SubmitEvent| {
                        ev.prevent_default();
                        let o = other.get_untracked().trim().to_lowercase();
                        compare.set(None);
                        compare.set(Some(o));
                    }>
                        <label for="equivalence-other">"Equivalent to another matrix? "</label>
                        <input id="equivalence-other" type="text" placeholder="another matrix's id" prop:value=move || other.get()
                            on:input=move |ev| other.set(event_target_value(&ev)) />
                        " "<button type="submit" data-derived="equivalence">"Compare"</button>
                    </form>
                    <span class="conv">"Whether another stored matrix of the same order is equivalent (rows and columns permuted and negated): a checked certificate, an invariant that differs, or “undecided”."</span>
                    {move || compare.get().map(|o| {
                        if hadamard_core::id::is_id(&o) {
                            view! { <EquivalenceResult a=id_eq.clone() b=o /> }.into_any()
                        } else {
                            view! { <p class="bad">"Type the other matrix's full id (64 hexadecimal digits)."</p> }.into_any()
                        }
                    })}
                </li>
            </ul>
        </section>
    }
}
