//! Planner tests: statuses against the literature, coverage counts, dimensions, speed.

use super::*;
use std::time::Instant;

fn status(n: u64) -> Status {
    order_info(n).status
}

fn has_route(info: &OrderInfo, method: Method, reference_part: &str) -> bool {
    fn walk(s: &Step, part: &str) -> bool {
        s.reference.contains(part) || s.children.iter().any(|c| walk(c, part))
    }
    info.routes
        .iter()
        .any(|r| r.method == method && walk(&r.tree, reference_part))
}

#[test]
fn statuses_of_landmark_orders() {
    use Status::*;
    // Standard theorem (references.md#r1-impossible-orders): orders other than 1, 2 and multiples of 4 are impossible.
    assert_eq!((status(3), status(6)), (Impossible, Impossible));
    // Sylvester 1867: orders 1 and 2.
    assert_eq!((status(1), status(2)), (Constructible, Constructible));
    // Paley 1933: 12 = 11 + 1.
    assert_eq!(status(12), Constructible);
    // Đoković, Combinatorica 28 (2008): 668 and 716 are open.
    assert_eq!((status(668), status(716)), (Open, Open));
    // Đoković, Golubitsky and Kotsireas, J. Combin. Des. 22 (2014): 1004 is known.
    assert_eq!(status(1004), Known);
    // references.md#r4-doubles-of-open-orders: 1336 = 2·668 and 1432 = 2·716 are known orders.
    assert_eq!((status(1336), status(1432)), (Known, Known));
}

#[test]
fn order_92_lists_williamson_23_with_its_paper() {
    let info = order_info(92);
    // Baumert, Golomb and Hall, Bull. Amer. Math. Soc. 68 (1962): Williamson matrices of order 23.
    assert!(
        has_route(&info, Method::Williamson, "Baumert, Golomb and Hall"),
        "{info:#?}"
    );
    assert!(info.literature.as_deref().unwrap().contains("1962"));
    // The seed catalogue holds Williamson matrices of order 23 found by our own search, so 92 is
    // built, not only cited.
    assert_eq!(info.status, Status::Constructible);
    let best = &info.routes[0];
    assert!(best.buildable);
    let v = build(best).unwrap();
    assert_eq!(v.order(), 92);
    assert!(crate::verify::is_hadamard(v.matrix()));
}

#[test]
fn order_428_goes_through_tt36() {
    let info = order_info(428);
    // Kharaghani and Tayfeh-Rezaie, J. Combin. Des. 13 (2005): 428 from TT(36), T-length 3·36 − 1 = 107.
    assert!(
        has_route(&info, Method::TSequences, "Kharaghani and Tayfeh-Rezaie"),
        "{info:#?}"
    );
    assert_ne!(info.status, Status::Open);
}

#[test]
fn open_orders_have_no_route_and_others_up_to_2000_are_known() {
    let open = [
        668, 716, 892, 1132, 1244, 1388, 1436, 1676, 1772, 1916, 1948, 1964,
    ];
    for (n, s) in coverage(2000) {
        // Đoković 2008 less 1004 (DGK 2014): exactly these are open up to 2000.
        if open.contains(&n) {
            assert_eq!(s, Status::Open, "{n}");
            assert!(
                order_info(n).routes.is_empty(),
                "{n}: a route to an open order would be news"
            );
        } else {
            assert!(
                matches!(s, Status::Constructible | Status::Known),
                "{n}: {s:?}"
            );
        }
    }
}

#[test]
fn known_order_counts() {
    // Derived: 1208/4 = 302 multiples of 4 up to 1208, less the 4 open ones (668, 716, 892, 1132;
    // survey arXiv 2411.18897) gives 298; 1 and 2 are not counted. Likewise 2000/4 = 500, less
    // the 12 open orders, gives 488.
    let known = |max| {
        coverage(max)
            .into_iter()
            .filter(|&(n, s)| n >= 4 && matches!(s, Status::Constructible | Status::Known))
            .count()
    };
    assert_eq!(known(1208), 298);
    assert_eq!(known(2000), 488);
}

#[test]
fn classical_constructions_cover_most_orders_up_to_1208() {
    use Method::*;
    let mut p = Planner::only(&[Sylvester, PaleyOne, PaleyTwo, Kronecker, ConferenceProduct]);
    let n = (4..=1208)
        .step_by(4)
        .filter(|&n| p.status(n) == Status::Constructible)
        .count();
    // The brief's target: at least 230 of the 298 known orders up to 1208.
    assert!(n >= 230, "{n}");
    // references.md#r5-the-conference-matrix-product: conference products add 520, 952 over Sylvester, Paley and Kronecker.
    let mut without = Planner::only(&[Sylvester, PaleyOne, PaleyTwo, Kronecker]);
    for n in [520, 952] {
        assert_eq!(
            (p.status(n), without.status(n)),
            (Status::Constructible, Status::Known),
            "{n}"
        );
        let route = p.best(n).unwrap();
        assert_eq!(route.method, ConferenceProduct, "{n}");
        assert_eq!(build(&route).unwrap().order() as u64, n);
    }
    // references.md#r2-paley-and-kronecker-up-to-100: Paley and Kronecker cover every multiple of 4 up to 100 except 92.
    for n in (4..=100).step_by(4) {
        assert_eq!(without.status(n) == Status::Constructible, n != 92, "{n}");
    }
}

#[test]
fn dimensions_for_ml_users() {
    // references.md#r11-dimensions-users-ask-for: 13696 = 32·428, 10944 = 16·684, 3584 = 128·28, 1152 = 32·36.
    for (d, a, m0) in [
        (13696, 5, 428),
        (10944, 4, 684),
        (3584, 7, 28),
        (1152, 5, 36),
    ] {
        let adv = dimension_advice(d);
        let first = &adv.options[0];
        assert_eq!((first.power_of_two, first.dense), (a, m0), "{adv:#?}");
        assert_eq!(first.factored, format!("2^{a} · {m0}"));
    }
    assert_eq!(dimension_advice(13696).options[0].status, Status::Known);
    assert!(dimension_advice(6).options.is_empty());
    assert!(dimension_advice(6).note.contains("multiple of 4"));
    // 4·668 = 2672 = 2·1336: 1336 is known, 668 is open.
    let adv = dimension_advice(2672);
    assert_eq!(
        adv.options
            .iter()
            .map(|f| f.dense)
            .collect::<Vec<_>>()
            .first(),
        Some(&1336)
    );
    assert!(adv.blocked.iter().any(|f| f.dense == 668));
    assert_eq!(dimension_advice(1 << 20).options[0].factored, "2^20");
}

#[test]
fn smallest_orders_at_least_k() {
    assert_eq!(smallest_known_at_least(665).unwrap().order, 672);
    assert_eq!(smallest_known_at_least(668).unwrap().order, 672);
    assert_eq!(smallest_known_at_least(3).unwrap().order, 4);
    assert_eq!(smallest_constructible_at_least(1).unwrap().order, 1);
    let c = smallest_constructible_at_least(92).unwrap();
    assert!(c.order >= 92 && c.status == Status::Constructible);
}

#[test]
fn huge_orders_answer_fast() {
    let t = Instant::now();
    let info = order_info(1_000_000_000_000);
    assert!(t.elapsed().as_millis() < 2000, "{:?}", t.elapsed());
    // 10^12 = 2^12 · 5^12 = 2^10 · 4·5^12, and 5^12 ≡ 1 mod 4: Paley II of q = 5^12 gives 2(5^12 + 1).
    assert!(
        matches!(info.status, Status::Constructible | Status::Known),
        "{info:?}"
    );
    for n in [999_999_999_996u64, 1 << 40, 4 * 1_000_000_007] {
        let t = Instant::now();
        let _ = order_info(n);
        assert!(t.elapsed().as_millis() < 2000, "{n}: {:?}", t.elapsed());
    }
}

#[test]
fn above_2000_is_never_called_open() {
    for (n, s) in coverage(6000).into_iter().filter(|&(n, _)| n > 2000) {
        assert_ne!(s, Status::Open, "{n}");
    }
    // 2·1004: twice a known order is known.
    assert!(matches!(
        status(2008),
        Status::Known | Status::Constructible
    ));
}

#[test]
fn ranking_prefers_buildable_then_small_dense_factor() {
    let info = order_info(24);
    // 24 = 6·4 as a conference product has dense factor 6; 2·12 as a Kronecker product 12;
    // both beat Paley I's 24 (q = 23).
    let dense = |m| {
        info.routes
            .iter()
            .find(|r| r.method == m)
            .map(|r| r.largest_dense_factor)
    };
    assert!(info.routes[0].buildable);
    assert_eq!(
        (
            dense(Method::ConferenceProduct),
            dense(Method::Kronecker),
            dense(Method::PaleyOne)
        ),
        (Some(6), Some(12), Some(24))
    );
    assert!(info
        .routes
        .iter()
        .any(|r| r.method == Method::PaleyOne && r.skew));
    for w in info.routes.windows(2) {
        assert!(
            (!w[0].buildable, w[0].largest_dense_factor)
                <= (!w[1].buildable, w[1].largest_dense_factor)
        );
    }
}

#[test]
fn json_shape_follows_the_interface() {
    let v = serde_json::to_value(order_info(12)).unwrap();
    // interface.md: {"order": N, "status": S, "routes": [...]}.
    assert_eq!(v["order"], 12);
    assert_eq!(v["status"], "constructible");
    assert!(v["routes"]
        .as_array()
        .unwrap()
        .iter()
        .any(|r| r["method"] == "paley_one"));
    assert_eq!(
        serde_json::to_value(Status::Uncovered).unwrap(),
        "uncovered"
    );
    assert_eq!(
        serde_json::to_value(Method::ConferenceProduct).unwrap(),
        "conference_product"
    );
    assert_eq!(
        serde_json::to_value(order_info(6)).unwrap()["status"],
        "impossible"
    );
    assert!(order_info(6).note.contains("4 and 8"));
}

#[test]
fn every_constructible_order_up_to_1208_builds_and_verifies() {
    // `coverage` must not claim an order this program cannot build: every order reported
    // constructible is built by its best route. In release (CI) that is all of them, a few
    // seconds; a debug build takes every seventh, plus the orders each new route first reached.
    let mut p = Planner::new();
    let firsts = [92u64, 116, 156, 188, 324, 356, 520, 712, 872, 952, 1108];
    let mut built = 0;
    for (k, n) in [1u64, 2]
        .into_iter()
        .chain((4..=1208).step_by(4))
        .enumerate()
    {
        if cfg!(debug_assertions) && k % 7 != 0 && !firsts.contains(&n) {
            continue;
        }
        if p.status(n) != Status::Constructible {
            continue;
        }
        let info = p.order_info(n);
        let v = build(&info.routes[0]).unwrap_or_else(|e| panic!("{n}: {e}"));
        assert_eq!(v.order() as u64, n);
        // numpy-free restatement of the definition: H·Hᵀ = nI, decided by verify::is_hadamard.
        assert!(crate::verify::is_hadamard(v.matrix()), "{n}");
        built += 1;
    }
    assert!(built > 0);
}

#[test]
fn coverage_reaches_the_seeded_orders() {
    // Counts with the seed catalogue as merged (docs/coverage.md lists the orders still
    // missing). A drop means a route or a seed entry was lost. Issue 4's targets: at least 270
    // of the 298 known orders ≤ 1208, and at least 420 of the 488 ≤ 2000; the 4q construction
    // (issue 12) brought them to 281 and 463.
    let counts = coverage(2000);
    let constructible = |max: u64| {
        counts
            .iter()
            .filter(|&&(n, s)| n >= 4 && n <= max && s == Status::Constructible)
            .count()
    };
    assert!(constructible(1208) >= 281, "{}", constructible(1208));
    assert!(constructible(2000) >= 463, "{}", constructible(2000));
}

#[test]
fn build_order_explains_failures() {
    assert!(matches!(
        build_order(668),
        Err(BuildError::NoRoute {
            status: Status::Open,
            ..
        })
    ));
    assert!(matches!(
        build_order(6),
        Err(BuildError::NoRoute {
            status: Status::Impossible,
            ..
        })
    ));
    assert!(matches!(
        build_order(1 << 40),
        Err(BuildError::TooLarge { .. })
    ));
    assert_eq!(build_order(12).unwrap().order(), 12);
    // Above the build limit a buildable route makes the order known, not constructible.
    assert_eq!(status(1 << 20), Status::Known);
    assert!(order_info(1 << 20).note.contains("build limit"));
}

#[test]
fn recipe_round_trip_gives_the_same_matrix() {
    // Sylvester–Kronecker, Paley, a Williamson array (m = 23), Cooper–Wallis (156 = 4·3·13),
    // T-sequences (188 = 4·47, from TT(16)), a conference product (520 = 26·20) and the 4q
    // construction (100 = 4·25 over GF(25), 436 = 4·109).
    let cases = [
        (24u64, None),
        (48, None),
        (60, None),
        (108, None),
        (92, Some(Method::Williamson)),
        (156, Some(Method::CooperWallis)),
        (188, Some(Method::TSequences)),
        (520, Some(Method::ConferenceProduct)),
        (100, Some(Method::Miyamoto)),
        (436, Some(Method::Miyamoto)),
    ];
    for (n, method) in cases {
        let info = order_info(n);
        let route = info
            .routes
            .iter()
            .find(|r| r.buildable && method.is_none_or(|m| r.method == m))
            .unwrap_or_else(|| panic!("{n}: no buildable {method:?} route"));
        let first = build(route).unwrap();
        let mut recipe = recipe_for(route);
        assert_eq!(recipe.format, RECIPE_FORMAT);
        recipe.id = Some(first.id().to_string());
        let json = serde_json::to_string(&recipe).unwrap();
        let back: Recipe = serde_json::from_str(&json).unwrap();
        assert_eq!(build_recipe(&back).unwrap().id(), first.id(), "{n}");
        let mut wrong = back.clone();
        wrong.id = Some("0".repeat(64));
        assert!(matches!(
            build_recipe(&wrong),
            Err(BuildError::IdMismatch { .. })
        ));
        wrong.order += 4;
        assert!(matches!(
            build_recipe(&wrong),
            Err(BuildError::BadRecipe(_))
        ));
    }
}

#[test]
fn recipes_carry_their_sequences_and_refuse_tampered_ones() {
    // A seed leaf's sequences are in the recipe, so replay needs no catalogue; a flipped sign
    // fails the leaf's defining identity and names the node.
    let route = order_info(92)
        .routes
        .into_iter()
        .find(|r| r.buildable && r.method == Method::Williamson)
        .unwrap();
    let mut recipe = recipe_for(&route);
    let leaf = &mut recipe.tree.children[0];
    assert_eq!(leaf.method(), Method::Seed);
    let Construction::Seed(SeedLeaf {
        data: SeedData::Williamson(w),
        ..
    }) = &mut leaf.construction
    else {
        panic!("{leaf:?}");
    };
    assert_eq!(w.a.len(), 23);
    // Flip a₁ and a₂₂ together, so the row stays symmetric but the identity fails.
    w.a[1] = -w.a[1];
    w.a[22] = -w.a[22];
    assert!(matches!(
        build_recipe(&recipe),
        Err(BuildError::Construct {
            method: Method::Seed,
            order: 23,
            ..
        })
    ));
    // A matrix node where a sequence belongs is a malformed recipe, not a panic.
    let mut recipe = recipe_for(&route);
    recipe.tree.children[0] = order_info(4).routes[0].tree.clone();
    assert!(matches!(
        build_recipe(&recipe),
        Err(BuildError::BadRecipe(_))
    ));
}

#[test]
fn miyamoto_4q_orders_are_built_recursively() {
    // references.md#r13-miyamotos-4q-theorem (Miyamoto, J. Combin. Theory A 57, 1991): a prime
    // power q ≡ 1 (mod 4) and an order q − 1 give 4q. It adds, up to 1208, 4q for
    // q = 89, 109, 113, 149, 193, 233, 241, 277, and their doubles 712 = 2·356, 1192 = 2·596.
    let mut p = Planner::new();
    for n in [356u64, 436, 452, 596, 772, 932, 964, 1108] {
        let best = p.best(n).unwrap();
        assert_eq!(
            (best.method, best.buildable),
            (Method::Miyamoto, true),
            "{n}"
        );
        assert_eq!(best.tree.construction, Construction::Miyamoto { q: n / 4 });
        assert_eq!(best.tree.children[0].order, n / 4 - 1);
    }
    for n in [712u64, 1192] {
        assert_eq!(p.status(n), Status::Constructible, "{n}");
    }
    // 1076 = 4·269 rests on order 268 (a Goethals–Seidel search's result, issue 12): the route
    // is listed now, and it is buildable exactly when 268 is.
    let info = p.order_info(1076);
    let r = info
        .routes
        .iter()
        .find(|r| r.method == Method::Miyamoto)
        .expect("a Miyamoto route to 1076");
    assert_eq!(r.tree.children[0].order, 268);
    assert_eq!(
        r.buildable,
        p.status(268) == Status::Constructible,
        "{info:#?}"
    );
    // Orders 4q with q ≡ 3 (mod 4) or q not a prime power get no such route: 4·107, 4·111.
    for n in [428u64, 444] {
        assert!(
            !p.routes(n).iter().any(|r| r.method == Method::Miyamoto),
            "{n}"
        );
    }
}

#[test]
fn yamada_first_theorem_is_miyamoto_with_a_doubled_k() {
    // references.md#r13-miyamotos-4q-theorem: Yamada's first theorem (J. Austral. Math. Soc. A
    // 46, 1989), q ≡ 1 (mod 8) and order (q − 1)/2 give 4q, here as Miyamoto's 4q with
    // K = H₂ ⊗ H_{(q−1)/2}. q = 17: K = H₂ ⊗ H₈, listed beside the direct K = H₁₆.
    let info = order_info(68);
    let r = info
        .routes
        .iter()
        .find(|r| r.method == Method::Miyamoto && r.tree.reference.contains("Yamada"))
        .unwrap_or_else(|| panic!("{info:#?}"));
    let k = &r.tree.children[0];
    assert_eq!((k.method(), k.order), (Method::Kronecker, 16));
    assert_eq!((k.children[0].order, k.children[1].order), (2, 8));
    let v = build(r).unwrap();
    assert_eq!(v.order(), 68);
    assert!(crate::verify::is_hadamard(v.matrix()));
    // Case (ii) stays listed and unbuilt.
    assert!(!Construction::Yamada {
        case: YamadaCase::Second,
        q: 13
    }
    .implemented());
}
