//! Thick incoherent layers anywhere in a stack: against the closed-form sum
//! of multiple incoherent reflections, the substrate-sheet form, symmetry
//! and energy balance.

mod common;

use common::{c, layer, rt_at, stack};
use lamella::optics::{Behind, Exit, Node, Rt, Stack};
use num_complex::Complex64;
use proptest::prelude::*;

fn thick(medium: usize, thickness_nm: f64) -> Node {
    Node::Incoherent {
        medium,
        thickness_nm,
    }
}

/// A slab of index n and thickness d in air: with one face's Fresnel
/// reflectance R₁ (T₁ = 1 − R₁) and single-pass attenuation α, the
/// incoherent sum gives R = R₁ + T₁²R₁α²/(1 − R₁²α²) and
/// T = T₁²α/(1 − R₁²α²) (Harbecke, Appl. Phys. B 39, 165, 1986; at normal
/// incidence, Fresnel R₁ = |(1 − n)/(1 + n)|²).
#[test]
fn a_slab_in_air_sums_its_reflections_in_intensity() {
    let wl = 550.0;
    for n in [c(1.5, 0.0), c(1.5, 1e-5), c(2.4, 3e-4)] {
        let media = [c(1.0, 0.0), n];
        let d = 1e6;
        let s = stack(0, vec![thick(1, d)], 0);
        let x = rt_at(&s, &media, wl, 0.0);
        let r1 = ((1.0 - n) / (1.0 + n)).norm_sqr();
        // Normal-incidence power transmittance into an absorbing medium and
        // out of it again: the face's T₁ is 1 − R₁ both ways (Re of n·n̄/n̄…);
        // at these k the difference is below 1e-9.
        let t1 = 1.0 - r1;
        let alpha = (-4.0 * std::f64::consts::PI * n.im * d / wl).exp();
        let den = 1.0 - r1 * r1 * alpha * alpha;
        let (r, t) = (
            r1 + t1 * t1 * r1 * alpha * alpha / den,
            t1 * t1 * alpha / den,
        );
        for (got, want) in [(x.rs, r), (x.rp, r), (x.ts, t), (x.tp, t)] {
            assert!((got - want).abs() < 1e-9, "n = {n}: {x:?} vs R {r}, T {t}");
        }
    }
}

/// An incoherent layer at the end of the stack, before a medium, gives the
/// same numbers as the substrate-sheet form of the same structure.
#[test]
fn a_final_incoherent_layer_equals_the_substrate_sheet() {
    let media = [
        c(1.0, 0.0),
        c(2.3, 0.0),
        c(1.46, 0.0),
        c(1.58, 2e-5),
        c(1.33, 0.0),
    ];
    let film = vec![layer(1, 60.0), layer(2, 95.0), layer(1, 60.0)];
    let mut nodes = film.clone();
    nodes.push(thick(3, 23e3));
    let in_stack = stack(0, nodes, 4);
    let sheet = Stack {
        incident: 0,
        nodes: film,
        exit: Exit::Sheet {
            medium: 3,
            thickness_nm: 23e3,
            behind: Behind::Medium(4),
        },
    };
    for deg in [0.0, 35.0, 70.0] {
        for wl in [420.0, 555.0, 700.0] {
            assert_eq!(
                rt_at(&in_stack, &media, wl, deg),
                rt_at(&sheet, &media, wl, deg)
            );
        }
    }
}

/// The stack read backwards.
fn reversed(s: &Stack) -> Stack {
    let Exit::Medium(exit) = s.exit else {
        unreachable!()
    };
    fn rev(nodes: &[Node]) -> Vec<Node> {
        nodes
            .iter()
            .rev()
            .map(|n| match n {
                Node::Repeat { count, nodes } => Node::Repeat {
                    count: *count,
                    nodes: rev(nodes),
                },
                other => other.clone(),
            })
            .collect()
    }
    Stack {
        incident: exit,
        nodes: rev(&s.nodes),
        exit: Exit::Medium(s.incident),
    }
}

fn medium() -> impl Strategy<Value = Complex64> + Clone {
    (1.2f64..2.6, prop_oneof![Just(0.0), 0.0f64..0.2]).prop_map(|(n, k)| c(n, k))
}

/// Random structures: coherent runs with repeats around one or two thick
/// layers, between lossless outer media.
fn structure() -> impl Strategy<Value = (Vec<Complex64>, Stack)> {
    (
        1.0f64..1.6,
        prop::collection::vec((medium(), 5.0f64..300.0), 0..5),
        (
            1.3f64..1.7,
            prop_oneof![Just(0.0), 0.0f64..1e-4],
            1e3f64..1e6,
        ),
        prop::collection::vec((medium(), 5.0f64..300.0), 0..5),
        prop::option::of((1.3f64..1.7, 1e4f64..5e5)),
        1.0f64..1.8,
        1u64..4,
    )
        .prop_map(|(n0, front, (sn, sk, sd), back, second, nx, count)| {
            let mut media = vec![c(n0, 0.0)];
            let run = |layers: &[(Complex64, f64)], media: &mut Vec<Complex64>| -> Vec<Node> {
                layers
                    .iter()
                    .map(|&(n, d)| {
                        media.push(n);
                        layer(media.len() - 1, d)
                    })
                    .collect()
            };
            let mut nodes = run(&front, &mut media);
            if nodes.len() > 1 {
                let tail = nodes.split_off(1);
                nodes.push(Node::Repeat { count, nodes: tail });
            }
            media.push(c(sn, sk));
            nodes.push(thick(media.len() - 1, sd));
            nodes.extend(run(&back, &mut media));
            if let Some((n2, d2)) = second {
                media.push(c(n2, 0.0));
                nodes.push(thick(media.len() - 1, d2));
            }
            media.push(c(nx, 0.0));
            let exit = media.len() - 1;
            (media, stack(0, nodes, exit))
        })
}

fn finite_unit(x: &Rt) -> bool {
    [x.rs, x.rp, x.ts, x.tp]
        .iter()
        .all(|v| v.is_finite() && (-1e-12..=1.0 + 1e-12).contains(v))
}

proptest! {
    #![proptest_config(ProptestConfig::with_cases(300))]

    /// Energy balance: R + T ≤ 1, with equality when nothing absorbs; and
    /// the same T from either side (reciprocity, Born & Wolf, *Principles of
    /// Optics*, 7th ed. 1999, §1.6; it carries over to intensity sums).
    #[test]
    fn energy_balance_and_reciprocity((media, s) in structure(), wl in 380.0f64..780.0, deg in 0.0f64..60.0) {
        let x = rt_at(&s, &media, wl, deg);
        prop_assert!(finite_unit(&x), "{x:?}");
        let lossy = media.iter().any(|n| n.im > 0.0);
        for (r, t) in [(x.rs, x.ts), (x.rp, x.tp)] {
            let a = 1.0 - r - t;
            if lossy { prop_assert!(a >= -1e-12, "A = {a}"); } else { prop_assert!(a.abs() < 1e-12, "A = {a}"); }
        }
        // Same angle inside the exit medium for the reversed stack.
        let n0 = media[s.incident].re;
        let Exit::Medium(exit) = s.exit else { unreachable!() };
        let sin_exit = n0 * deg.to_radians().sin() / media[exit].re;
        prop_assume!(sin_exit < 0.99);
        let y = rt_at(&reversed(&s), &media, wl, sin_exit.asin().to_degrees());
        prop_assert!((x.ts - y.ts).abs() < 1e-9 && (x.tp - y.tp).abs() < 1e-9, "{x:?} vs reversed {y:?}");
    }
}

/// Scenes with thick incoherent layers anywhere, against R and T computed
/// with mpmath 1.3.0 (PyPI) at 40 digits by the intensity matrices of
/// Katsidis & Siapkas (Appl. Opt. 41, 3978, 2002):
/// `reference_data/incoherent/`, with the script that made it.
#[test]
fn scenes_with_incoherent_layers_match_the_intensity_matrix_reference() {
    use serde_json::{Value, json};
    let doc: Value = serde_json::from_str(include_str!(
        "../reference_data/incoherent/incoherent_reference.json"
    ))
    .unwrap();
    let cases = doc["cases"].as_array().unwrap();
    assert_eq!(cases.len(), 30);
    let mut worst = 0.0f64;
    for (i, case) in cases.iter().enumerate() {
        let mut materials = serde_json::Map::new();
        let stack: Vec<Value> = case["stack"]
            .as_array()
            .unwrap()
            .iter()
            .enumerate()
            .map(|(j, l)| {
                let name = format!("m{j}");
                materials.insert(name.clone(), json!({"n": l["n"], "k": l["k"]}));
                let mut item = l.clone();
                let o = item.as_object_mut().unwrap();
                o.remove("n");
                o.remove("k");
                o.insert("material".into(), json!(name));
                item
            })
            .collect();
        materials.insert("sub".into(), json!({"n": case["substrate_n"]}));
        let scene = json!({
            "stack": stack, "substrate": "sub", "materials": materials,
            "wavelengths_nm": case["wavelengths_nm"], "angles_deg": case["angles_deg"],
        });
        let scene =
            lamella::scene::Scene::from_json(&scene.to_string(), &|_| Err("no files".into()))
                .unwrap_or_else(|e| panic!("case {i}: {e}"));
        let spectra = scene.spectra().unwrap();
        for a in 0..spectra.angles_deg.len() {
            for (w, x) in spectra.at_angle(a).iter().enumerate() {
                for (got, key) in [(x.rs, "R_s"), (x.rp, "R_p"), (x.ts, "T_s"), (x.tp, "T_p")] {
                    let want = case[key][a][w].as_f64().unwrap();
                    worst = worst.max((got - want).abs());
                    assert!(
                        (got - want).abs() < 1e-9,
                        "case {i}, {key} at angle {a}, λ {w}: {got} vs {want}"
                    );
                }
            }
        }
    }
    println!("largest deviation from the reference: {worst:e}");
}

fn read(scene: serde_json::Value) -> Result<lamella::scene::Scene, String> {
    lamella::scene::Scene::from_json(&scene.to_string(), &|_| Err("no files".into()))
        .map_err(|e| e.to_string())
}

/// The `incoherent` key: where it may sit, how its thickness is written,
/// and the substrate-sheet form giving the same numbers.
#[test]
fn incoherent_items_in_scene_files() {
    use serde_json::json;
    let film = json!({"material": "mgf2", "thickness_nm": 99.6});
    let glass = json!({"material": "bk7", "thickness_um": 3000, "incoherent": true});
    // An antireflection layer on both faces of a window.
    let window = read(json!({"stack": [film, glass, film], "substrate": "air"})).unwrap();
    let sheet = read(json!({
        "stack": [film],
        "substrate": {"material": "bk7", "thickness_um": 3000, "behind": "air"}
    }))
    .unwrap();
    let (w, s) = (window.spectra().unwrap(), sheet.spectra().unwrap());
    // The coated back face reflects less than the bare one.
    assert!(w.rt[170].rs < s.rt[170].rs && w.rt[170].ts > s.rt[170].ts);
    let bare_back = read(json!({"stack": [film, glass], "substrate": "air"})).unwrap();
    assert_eq!(bare_back.spectra().unwrap().rt, s.rt);

    let refusals = [
        (
            json!({"stack": [{"repeat": 2, "stack": [glass]}], "substrate": "air"}),
            "stack[0].stack[0].incoherent",
        ),
        (
            json!({"stack": [{"material": "bk7", "thickness_nm": 5, "thickness_um": 5}], "substrate": "air"}),
            "stack[0].thickness_um",
        ),
        (
            json!({"stack": [{"material": "bk7", "thickness_um": 5, "incoherent": "yes"}], "substrate": "air"}),
            "stack[0].incoherent",
        ),
        (
            json!({"stack": [{"material": "bk7", "thickness_um": 0, "incoherent": true}], "substrate": "air"}),
            "stack[0].thickness_um",
        ),
        (
            json!({"stack": [{"material": "bk7"}], "substrate": "air"}),
            "stack[0].thickness_nm",
        ),
    ];
    for (scene, key) in refusals {
        let e = read(scene).unwrap_err();
        assert!(e.starts_with(key), "{e}");
    }
    let thin = read(json!({"stack": [{"material": "bk7", "thickness_nm": 400, "incoherent": true}], "substrate": "air"})).unwrap();
    assert!(
        thin.warnings.iter().any(|w| w.key == "stack[0].incoherent"
            && w.message.contains("coherent layer is likely meant"))
    );
}

/// Beyond the critical angle of a thick lossless layer no light travels in
/// it: a glass-incident stack with a thick air gap reflects totally, with
/// every number finite (a regression: the back-face flows divided by
/// Re η = 0).
#[test]
fn a_thick_layer_beyond_its_critical_angle_reflects_everything() {
    let media = [c(1.5, 0.0), c(2.0, 0.0), c(1.0, 0.0), c(1.5, 0.0)];
    let s = stack(0, vec![layer(1, 80.0), thick(2, 1e5), layer(1, 80.0)], 3);
    for deg in [45.0, 60.0, 85.0] {
        let x = rt_at(&s, &media, 550.0, deg);
        assert!(finite_unit(&x), "{x:?}");
        assert!(
            (x.rs - 1.0).abs() < 1e-12 && (x.rp - 1.0).abs() < 1e-12 && x.ts == 0.0 && x.tp == 0.0,
            "{x:?}"
        );
        let (terms, at) = {
            let at = lamella::optics::Probe::new(550.0, 1.5, deg);
            let t: Vec<_> = media
                .iter()
                .map(|&n| lamella::optics::MediumTerms::new(n, at.beta()))
                .collect();
            (t, at)
        };
        let a = s.absorption(&terms, &at);
        assert!(a.layers.iter().flatten().all(|v| v.abs() < 1e-12), "{a:?}");
    }
}
