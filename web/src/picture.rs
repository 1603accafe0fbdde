//! The matrix drawn on a canvas, with zoom and panning for large orders.
//!
//! One idea: the canvas never holds more than about 512×512 pixels, whatever the order. Each
//! redraw computes the visible window straight from the packed bits: when the window is smaller
//! than the canvas an entry is a square of pixels, and when it is larger a pixel covers a block
//! of entries and is shaded by the block's share of −1s (as core's PNG writer does). So a matrix
//! of order 4096 costs a 512×512 image, not a 4096×4096 one, and zooming is a redraw.
//!
//! Colours are the registry's palette, shared with core's PNG writer: +1 warm off-white, −1 deep
//! ink blue, rows being pointed out tinted red, entries pointed out red, and erased (unknown)
//! entries amber.

use hadamard_core::Matrix;
use leptos::html::Canvas;
use leptos::prelude::*;
use std::sync::Arc;
use wasm_bindgen::{Clamped, JsCast};

const PLUS: [f64; 3] = [244.0, 239.0, 230.0];
const MINUS: [f64; 3] = [29.0, 53.0, 87.0];
const MARK: [f64; 3] = [230.0, 57.0, 70.0];
/// Erased entries (`?`): neither +1 nor −1, so a colour off the +1…−1 scale.
const UNKNOWN: [f64; 3] = [233.0, 170.0, 60.0];
/// How much of the mark colour a marked row takes (as in core's PNG writer).
const MARK_BLEND: f64 = 0.45;
/// The canvas side in pixels that the drawing aims for.
const SIDE: usize = 512;

fn mix(a: [f64; 3], b: [f64; 3], t: f64) -> [f64; 3] {
    [
        a[0] + (b[0] - a[0]) * t,
        a[1] + (b[1] - a[1]) * t,
        a[2] + (b[2] - a[2]) * t,
    ]
}

/// What part of the matrix is on the canvas.
#[derive(Clone, Copy, PartialEq, Debug)]
struct View {
    zoom: usize,
    row0: usize,
    col0: usize,
}

/// Entries visible per side at a zoom level.
fn window_side(m: &Matrix, zoom: usize) -> usize {
    m.rows().max(m.cols()).div_ceil(zoom).max(1)
}

fn max_zoom(m: &Matrix) -> usize {
    // Zoom until about eight entries fill the side.
    let side = m.rows().max(m.cols());
    let mut z = 1;
    while side.div_ceil(z * 2) >= 8 {
        z *= 2;
    }
    z
}

fn clamp_view(m: &Matrix, v: View) -> View {
    let k = window_side(m, v.zoom);
    View {
        zoom: v.zoom,
        row0: v.row0.min(m.rows().saturating_sub(k)),
        col0: v.col0.min(m.cols().saturating_sub(k)),
    }
}

/// Draws the window `v` of `m`: a square of pixels per entry, or a shaded pixel per block.
fn draw(
    canvas: &web_sys::HtmlCanvasElement,
    m: &Matrix,
    marked: &[bool],
    cells: &[(usize, usize)],
    unknown: Option<&Matrix>,
    v: View,
) {
    let k = window_side(m, v.zoom);
    let vis_r = k.min(m.rows() - v.row0);
    let vis_c = k.min(m.cols() - v.col0);
    let (block, scale) = if k <= SIDE {
        (1, (SIDE / k).max(1))
    } else {
        (k.div_ceil(SIDE), 1)
    };
    let (w, h) = if block == 1 {
        (vis_c * scale, vis_r * scale)
    } else {
        (vis_c.div_ceil(block), vis_r.div_ceil(block))
    };
    let mut data = vec![0u8; w * h * 4];
    let colour = |share: f64, mark: bool| {
        let c = mix(PLUS, MINUS, share);
        let c = if mark { mix(c, MARK, MARK_BLEND) } else { c };
        [
            c[0].round() as u8,
            c[1].round() as u8,
            c[2].round() as u8,
            255,
        ]
    };
    if block == 1 {
        for r in 0..vis_r {
            let i = v.row0 + r;
            let mark = marked.get(i).copied().unwrap_or(false);
            let px = [colour(0.0, mark), colour(1.0, mark)];
            let q = colour_of(UNKNOWN);
            for c in 0..vis_c {
                let j = v.col0 + c;
                let rgba = if unknown.is_some_and(|u| u.is_negative(i, j)) {
                    q
                } else {
                    px[m.is_negative(i, j) as usize]
                };
                for y in r * scale..(r + 1) * scale {
                    let line = y * w * 4;
                    for x in c * scale..(c + 1) * scale {
                        data[line + x * 4..line + x * 4 + 4].copy_from_slice(&rgba);
                    }
                }
            }
        }
    } else {
        let mut counts = vec![0u32; w];
        let mut erased = vec![0u32; w];
        for py in 0..h {
            counts.iter_mut().for_each(|c| *c = 0);
            erased.iter_mut().for_each(|c| *c = 0);
            let r_lo = v.row0 + py * block;
            let r_hi = (r_lo + block).min(v.row0 + vis_r);
            let mut mark = false;
            for i in r_lo..r_hi {
                mark |= marked.get(i).copied().unwrap_or(false);
                for c in 0..vis_c {
                    counts[c / block] += m.is_negative(i, v.col0 + c) as u32;
                }
                if let Some(u) = unknown {
                    for c in 0..vis_c {
                        erased[c / block] += u.is_negative(i, v.col0 + c) as u32;
                    }
                }
            }
            for (px, &cnt) in counts.iter().enumerate() {
                let c_lo = px * block;
                let c_hi = (c_lo + block).min(vis_c);
                let area = ((r_hi - r_lo) * (c_hi - c_lo)).max(1) as f64;
                let mut rgba = colour(f64::from(cnt) / area, mark);
                if erased[px] > 0 {
                    let c = [f64::from(rgba[0]), f64::from(rgba[1]), f64::from(rgba[2])];
                    // At least a third amber, so a single erased entry in a block shows.
                    let t = (f64::from(erased[px]) / area).max(1.0 / 3.0);
                    rgba = colour_of(mix(c, UNKNOWN, t));
                }
                let at = (py * w + px) * 4;
                data[at..at + 4].copy_from_slice(&rgba);
            }
        }
    }
    // The entries pointed out, red, over everything else.
    for &(i, j) in cells {
        if !(v.row0..v.row0 + vis_r).contains(&i) || !(v.col0..v.col0 + vis_c).contains(&j) {
            continue;
        }
        let (r, c) = (i - v.row0, j - v.col0);
        let (ys, xs) = if block == 1 {
            (r * scale..(r + 1) * scale, c * scale..(c + 1) * scale)
        } else {
            (r / block..r / block + 1, c / block..c / block + 1)
        };
        for y in ys {
            for x in xs.clone() {
                let at = (y * w + x) * 4;
                data[at..at + 4].copy_from_slice(&[230, 57, 70, 255]);
            }
        }
    }
    canvas.set_width(w as u32);
    canvas.set_height(h as u32);
    let Ok(Some(ctx)) = canvas.get_context("2d") else {
        return;
    };
    let Ok(ctx) = ctx.dyn_into::<web_sys::CanvasRenderingContext2d>() else {
        return;
    };
    if let Ok(img) =
        web_sys::ImageData::new_with_u8_clamped_array_and_sh(Clamped(&data), w as u32, h as u32)
    {
        let _ = ctx.put_image_data(&img, 0.0, 0.0);
    }
}

fn colour_of(c: [f64; 3]) -> [u8; 4] {
    [
        c[0].round() as u8,
        c[1].round() as u8,
        c[2].round() as u8,
        255,
    ]
}

/// A zoomable picture of `matrix`. `marked` rows (0-based) are tinted red; `cells` are filled
/// red; the entries set in `unknown` (erased, `?`) are drawn amber, as neither +1 nor −1.
#[component]
pub fn MatrixPicture(
    matrix: Arc<Matrix>,
    #[prop(optional)] marked: Vec<usize>,
    #[prop(optional)] cells: Vec<(usize, usize)>,
    #[prop(default = None)] unknown: Option<Arc<Matrix>>,
    /// What the picture shows, for screen readers.
    label: String,
) -> impl IntoView {
    let canvas = NodeRef::<Canvas>::new();
    let view_sig = RwSignal::new(View {
        zoom: 1,
        row0: 0,
        col0: 0,
    });
    let mut mask = vec![false; matrix.rows()];
    for &r in &marked {
        if let Some(x) = mask.get_mut(r) {
            *x = true;
        }
    }
    let m = matrix.clone();
    let has_cells = !cells.is_empty();
    let has_unknown = unknown.is_some();
    Effect::new(move |_| {
        let v = view_sig.get();
        if let Some(c) = canvas.get() {
            draw(&c, &m, &mask, &cells, unknown.as_deref(), v);
        }
    });

    let m = matrix.clone();
    let zmax = max_zoom(&m);
    let set_zoom = {
        let m = m.clone();
        move |z: usize| {
            view_sig.update(|v| {
                let old_k = window_side(&m, v.zoom);
                let new_k = window_side(&m, z);
                // Keep the centre where it is.
                let cr = v.row0 + old_k / 2;
                let cc = v.col0 + old_k / 2;
                *v = clamp_view(
                    &m,
                    View {
                        zoom: z,
                        row0: cr.saturating_sub(new_k / 2),
                        col0: cc.saturating_sub(new_k / 2),
                    },
                );
            })
        }
    };
    let pan = {
        let m = m.clone();
        move |dr: isize, dc: isize| {
            view_sig.update(|v| {
                let r = (v.row0 as isize + dr).max(0) as usize;
                let c = (v.col0 as isize + dc).max(0) as usize;
                *v = clamp_view(
                    &m,
                    View {
                        zoom: v.zoom,
                        row0: r,
                        col0: c,
                    },
                );
            })
        }
    };
    let (rows, cols) = (m.rows(), m.cols());
    let m_k = m.clone();
    let caption = move || {
        let v = view_sig.get();
        let k = window_side(&m_k, v.zoom);
        if v.zoom == 1 {
            format!("All {rows} rows and {cols} columns.")
        } else {
            format!(
                "Zoom {}×: rows {}–{}, columns {}–{} of {rows}×{cols}. Arrow keys or dragging move the view.",
                v.zoom,
                v.row0 + 1,
                (v.row0 + k).min(rows),
                v.col0 + 1,
                (v.col0 + k).min(cols)
            )
        }
    };

    let m_key = m.clone();
    let zoom_key = set_zoom.clone();
    let pan_key = pan.clone();
    let on_key = move |ev: web_sys::KeyboardEvent| {
        let v = view_sig.get_untracked();
        let step = (window_side(&m_key, v.zoom) / 4).max(1) as isize;
        match ev.key().as_str() {
            "ArrowUp" => pan_key(-step, 0),
            "ArrowDown" => pan_key(step, 0),
            "ArrowLeft" => pan_key(0, -step),
            "ArrowRight" => pan_key(0, step),
            "+" | "=" => zoom_key((v.zoom * 2).min(zmax)),
            "-" => zoom_key((v.zoom / 2).max(1)),
            "0" => zoom_key(1),
            _ => return,
        }
        ev.prevent_default();
    };

    // Dragging: remember where the pointer went down and which view was showing.
    let drag = StoredValue::new(None::<(i32, i32, View)>);
    let m_drag = m.clone();
    let on_move = move |ev: web_sys::PointerEvent| {
        let Some((x0, y0, v0)) = drag.get_value() else {
            return;
        };
        let Some(c) = canvas.get_untracked() else {
            return;
        };
        let css = c.client_width().max(1) as f64;
        let k = window_side(&m_drag, v0.zoom) as f64;
        let per_px = k / css;
        let dc = ((x0 - ev.client_x()) as f64 * per_px).round() as isize;
        let dr = ((y0 - ev.client_y()) as f64 * per_px).round() as isize;
        let r = (v0.row0 as isize + dr).max(0) as usize;
        let cc = (v0.col0 as isize + dc).max(0) as usize;
        view_sig.set(clamp_view(
            &m_drag,
            View {
                zoom: v0.zoom,
                row0: r,
                col0: cc,
            },
        ));
    };
    let on_down = move |ev: web_sys::PointerEvent| {
        if view_sig.get_untracked().zoom > 1 {
            drag.set_value(Some((
                ev.client_x(),
                ev.client_y(),
                view_sig.get_untracked(),
            )));
            if let Some(c) = canvas.get_untracked() {
                let _ = c.set_pointer_capture(ev.pointer_id());
            }
        }
    };
    let on_up = move |_: web_sys::PointerEvent| drag.set_value(None);

    let zi = set_zoom.clone();
    let zo = set_zoom.clone();
    let zr = set_zoom;
    let zoomed = move || view_sig.get().zoom > 1;
    view! {
        <figure class="picture">
            <canvas
                node_ref=canvas
                tabindex="0"
                role="img"
                aria-label=label
                class:grab=zoomed
                on:keydown=on_key
                on:pointerdown=on_down
                on:pointermove=on_move
                on:pointerup=on_up
                on:pointercancel=on_up
            ></canvas>
            <figcaption>
                <span class="zoom" role="group" aria-label="Zoom" hidden={zmax == 1}>
                    <button type="button" on:click=move |_| zo((view_sig.get_untracked().zoom / 2).max(1))
                        disabled=move || view_sig.get().zoom == 1 aria-label="Zoom out">"−"</button>
                    <button type="button" on:click=move |_| zi((view_sig.get_untracked().zoom * 2).min(zmax))
                        disabled=move || { view_sig.get().zoom >= zmax } aria-label="Zoom in">"+"</button>
                    <button type="button" on:click=move |_| zr(1) disabled=move || !zoomed()>"Whole matrix"</button>
                </span>
                <span class="caption" aria-live="polite">{caption}</span>
                <span class="legend">
                    <i class="sw plus"></i>"+1 "<i class="sw minus"></i>"−1"
                    {(!marked.is_empty() || has_cells).then(|| view! { <i class="sw mark"></i>"rows pointed out" })}
                    {has_unknown.then(|| view! { " "<i class="sw unknown"></i>"erased (?)" })}
                </span>
            </figcaption>
        </figure>
    }
}
