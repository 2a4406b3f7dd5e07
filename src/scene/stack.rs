//! The layer design as written (layers, repeat groups, variables, jitter) and
//! its expansion into optics stacks.

use rand::SeedableRng;
use rand::rngs::StdRng;
use rand_distr::{Distribution, Normal};
use serde_json::Value;

use super::aniso::{self, Anisotropy};
use super::json::{Obj, pair, show};
use super::media::Registry;
use super::{Disorder, MAX_REPEAT};
use crate::error::{Error, Result};
use crate::optics::Node;

/// Thickness jitter: absolute or relative standard deviation.
#[derive(Debug, Clone, Copy, PartialEq)]
pub enum Sigma {
    /// σ in nm.
    Nm(f64),
    /// σ in percent of the layer's thickness.
    Pct(f64),
}

impl Sigma {
    fn of(self, thickness_nm: f64) -> f64 {
        match self {
            Sigma::Nm(s) => s,
            Sigma::Pct(p) => thickness_nm * p / 100.0,
        }
    }
}

/// One homogeneous layer of the design.
#[derive(Debug, Clone, PartialEq)]
pub struct Layer {
    /// Index into the scene's media.
    pub medium: usize,
    /// Nominal thickness in nm.
    pub thickness_nm: f64,
    /// Bounds the design tools may move the thickness within.
    pub vary_nm: Option<(f64, f64)>,
    /// The layer's own jitter, overriding the scene's `disorder`.
    pub sigma: Option<Sigma>,
    /// JSON pointer of the layer in the scene document.
    pub pointer: String,
    /// A thick layer treated incoherently (intensities add; only at the
    /// top level of `stack`).
    pub incoherent: bool,
    /// The layer's anisotropic material, orientation and helix, when its
    /// material is anisotropic (then `medium` is the medium of its first
    /// principal index, and only the 4×4 path computes the layer).
    pub anisotropy: Option<Anisotropy>,
}

/// A repeat group.
#[derive(Debug, Clone, PartialEq)]
pub struct Repeat {
    /// Number of periods.
    pub count: u64,
    /// One period.
    pub items: Vec<Item>,
    /// Thickness scale of the last period relative to the first (1 = no grading).
    pub chirp_scale: f64,
}

/// An element of the design.
#[derive(Debug, Clone, PartialEq)]
pub enum Item {
    /// A layer.
    Layer(Layer),
    /// A repeated group.
    Repeat(Repeat),
}

/// Parses a list of layers at `path`; `top` when it is the scene's own
/// `stack` (the only place an incoherent layer may sit).
pub(super) fn parse_items(
    v: &Value,
    path: &str,
    media: &mut Registry,
    top: bool,
) -> Result<Vec<Item>> {
    let list = v
        .as_array()
        .ok_or_else(|| Error::invalid(path, show(v), "expected a list of layers"))?;
    let pointer = format!("/{}", path.replace(['.', '['], "/").replace(']', ""));
    list.iter()
        .enumerate()
        .map(|(i, item)| {
            parse_item(
                item,
                &format!("{path}[{i}]"),
                &format!("{pointer}/{i}"),
                media,
                top,
            )
        })
        .collect()
}

fn parse_item(
    v: &Value,
    path: &str,
    pointer: &str,
    media: &mut Registry,
    top: bool,
) -> Result<Item> {
    let o = Obj::new(v, path)?;
    if o.get("repeat").is_some() {
        o.only(&["repeat", "stack", "chirp_scale"])?;
        let count = o.u64("repeat")?.unwrap_or(0);
        if count == 0 || count > MAX_REPEAT {
            return Err(Error::invalid(
                o.key("repeat"),
                show(&o.map["repeat"]),
                format!("must be a whole number from 1 to {MAX_REPEAT}"),
            ));
        }
        let inner = o
            .get("stack")
            .ok_or_else(|| o.missing("stack", "the layers of one period"))?;
        let items = parse_items(inner, &o.key("stack"), media, false)?;
        if items.is_empty() {
            return Err(Error::invalid(
                o.key("stack"),
                "[]",
                "a repeat group needs at least one layer",
            ));
        }
        let total = periods(&items).saturating_mul(count);
        if total > MAX_REPEAT {
            return Err(Error::invalid(
                o.key("repeat"),
                count,
                format!(
                    "nested repeat groups multiply to {total} periods in all; at most {MAX_REPEAT} are accepted"
                ),
            ));
        }
        let chirp_scale = o.f64("chirp_scale")?.unwrap_or(1.0);
        if chirp_scale <= 0.0 {
            return Err(Error::invalid(
                o.key("chirp_scale"),
                chirp_scale,
                "must be greater than zero",
            ));
        }
        return Ok(Item::Repeat(Repeat {
            count,
            items,
            chirp_scale,
        }));
    }
    o.only(&[
        "material",
        "thickness_nm",
        "thickness_um",
        "incoherent",
        "vary_nm",
        "vary_um",
        "sigma_nm",
        "sigma_pct",
        "note",
        "orientation",
        "helix",
    ])?;
    let name = o
        .str("material")?
        .ok_or_else(|| o.missing("material", "a material name (or `repeat` for a group)"))?;
    let (medium, anisotropy) = match media.crystal(name, &o.key("material"))? {
        Some((crystal, kind, first)) => (first, Some(aniso::parse_layer(&o, crystal, kind)?)),
        None => {
            for key in ["orientation", "helix"] {
                if let Some(v) = o.get(key) {
                    return Err(Error::invalid(
                        o.key(key),
                        show(v),
                        format!(
                            "`{name}` is isotropic: {key} needs a uniaxial or biaxial material"
                        ),
                    ));
                }
            }
            (media.resolve(name, &o.key("material"))?, None)
        }
    };
    if anisotropy.is_some() && o.get("incoherent") == Some(&Value::Bool(true)) {
        return Err(Error::invalid(
            o.key("incoherent"),
            "true",
            "an anisotropic layer is computed coherently; it cannot be incoherent",
        ));
    }
    let (thickness_key, thickness_nm) = match (o.f64("thickness_nm")?, o.f64("thickness_um")?) {
        (Some(nm), None) => ("thickness_nm", nm),
        (None, Some(um)) => ("thickness_um", um * 1e3),
        (Some(_), Some(um)) => {
            return Err(Error::invalid(
                o.key("thickness_um"),
                um,
                "give thickness_nm or thickness_um, not both",
            ));
        }
        (None, None) => return Err(o.missing("thickness_nm", "a number (or thickness_um)")),
    };
    if thickness_nm < 0.0 {
        return Err(Error::invalid(
            o.key(thickness_key),
            show(&o.map[thickness_key]),
            "must be ≥ 0",
        ));
    }
    let incoherent = match o.get("incoherent") {
        None => false,
        Some(Value::Bool(b)) => *b,
        Some(other) => {
            return Err(Error::invalid(
                o.key("incoherent"),
                show(other),
                "expected true or false",
            ));
        }
    };
    if incoherent && !top {
        return Err(Error::invalid(
            o.key("incoherent"),
            "true",
            "an incoherent layer cannot sit inside a repeat group or a platelet; \
             write it at the top level of `stack`",
        ));
    }
    if incoherent && thickness_nm <= 0.0 {
        return Err(Error::invalid(
            o.key(thickness_key),
            show(&o.map[thickness_key]),
            "an incoherent layer must be thicker than zero",
        ));
    }
    // Bounds for the design tools, in nm, or in µm for thick layers.
    let (vary_key, vary_scale) = match (o.get("vary_nm"), o.get("vary_um")) {
        (Some(_), Some(v)) => {
            return Err(Error::invalid(
                o.key("vary_um"),
                show(v),
                "give vary_nm or vary_um, not both",
            ));
        }
        (None, Some(_)) => ("vary_um", 1e3),
        _ => ("vary_nm", 1.0),
    };
    let vary_nm = o
        .get(vary_key)
        .map(|v| pair(v, &o.key(vary_key)))
        .transpose()?;
    if let Some((lo, hi)) = vary_nm
        && (lo < 0.0 || hi < lo)
    {
        return Err(Error::invalid(
            o.key(vary_key),
            format!("[{lo}, {hi}]"),
            "needs 0 ≤ low ≤ high",
        ));
    }
    let vary_nm = vary_nm.map(|(lo, hi)| (lo * vary_scale, hi * vary_scale));
    let sigma = parse_sigma(&o)?;
    Ok(Item::Layer(Layer {
        medium,
        thickness_nm,
        vary_nm,
        sigma,
        pointer: pointer.to_string(),
        incoherent,
        anisotropy,
    }))
}

/// The largest number of times any layer of `items` is repeated: the
/// product of the counts of the repeat groups around it.
fn periods(items: &[Item]) -> u64 {
    items
        .iter()
        .map(|i| match i {
            Item::Layer(_) => 1,
            Item::Repeat(r) => periods(&r.items).saturating_mul(r.count),
        })
        .max()
        .unwrap_or(1)
}

fn parse_sigma(o: &Obj) -> Result<Option<Sigma>> {
    let (nm, pct) = (o.f64("sigma_nm")?, o.f64("sigma_pct")?);
    let sigma = match (nm, pct) {
        (Some(_), Some(_)) => {
            return Err(Error::invalid(
                o.key("sigma_pct"),
                pct.unwrap(),
                "give sigma_nm or sigma_pct, not both",
            ));
        }
        (Some(s), None) => Some(Sigma::Nm(s)),
        (None, Some(p)) => Some(Sigma::Pct(p)),
        (None, None) => None,
    };
    if let Some(Sigma::Nm(s) | Sigma::Pct(s)) = sigma
        && s < 0.0
    {
        let key = if nm.is_some() {
            "sigma_nm"
        } else {
            "sigma_pct"
        };
        return Err(Error::invalid(o.key(key), s, "must be ≥ 0"));
    }
    Ok(sigma)
}

pub(super) fn parse_disorder(
    v: Option<&Value>,
    path: &str,
    items: &[Item],
) -> Result<Option<Disorder>> {
    let Some(v) = v else {
        let any_own = any_layer(items, &|l| l.sigma.is_some());
        return Ok(any_own.then_some(Disorder {
            sigma: None,
            realizations: 32,
            seed: 1,
        }));
    };
    let o = Obj::new(v, path)?;
    o.only(&["sigma_nm", "sigma_pct", "realizations", "seed"])?;
    let realizations = o.u64("realizations")?.unwrap_or(32);
    if !(1..=100_000).contains(&realizations) {
        return Err(Error::invalid(
            o.key("realizations"),
            realizations,
            "must be from 1 to 100000",
        ));
    }
    Ok(Some(Disorder {
        sigma: parse_sigma(&o)?,
        realizations: realizations as usize,
        seed: o.u64("seed")?.unwrap_or(1),
    }))
}

fn any_layer(items: &[Item], pred: &dyn Fn(&Layer) -> bool) -> bool {
    items.iter().any(|i| match i {
        Item::Layer(l) => pred(l),
        Item::Repeat(r) => any_layer(&r.items, pred),
    })
}

/// Layer nodes after expansion (a powered repeat counts its period once).
pub(super) fn expanded_layers(items: &[Item], jittered: bool) -> u64 {
    items
        .iter()
        .map(|i| match i {
            Item::Layer(_) => 1,
            Item::Repeat(r) => {
                let inner = expanded_layers(&r.items, jittered);
                if expands(r, jittered) {
                    inner.saturating_mul(r.count)
                } else {
                    inner
                }
            }
        })
        .fold(0u64, u64::saturating_add)
}

fn expands(r: &Repeat, jittered: bool) -> bool {
    r.chirp_scale != 1.0 || jittered
}

/// For each layer node that [`realise`] emits (depth first, a powered
/// repeat's period once), the number of the layer as written (depth first
/// over `items`, a layer inside a repeat group counted once), from `next`.
pub(super) fn written_layers_of_nodes(
    items: &[Item],
    jittered: bool,
    next: &mut usize,
    out: &mut Vec<usize>,
) {
    for item in items {
        match item {
            Item::Layer(_) => {
                out.push(*next);
                *next += 1;
            }
            Item::Repeat(r) => {
                let start = *next;
                let periods = if expands(r, jittered) { r.count } else { 1 };
                for _ in 0..periods {
                    *next = start;
                    written_layers_of_nodes(&r.items, jittered, next, out);
                }
            }
        }
    }
}

/// One node list per realisation: the ideal design when there is no
/// disorder, otherwise `realizations` seeded random draws.
pub fn realise(items: &[Item], disorder: Option<&Disorder>) -> Vec<Vec<Node>> {
    match disorder {
        None => vec![emit(items, 1.0, &mut None)],
        Some(d) => {
            let mut rng = StdRng::seed_from_u64(d.seed);
            (0..d.realizations)
                .map(|_| emit(items, 1.0, &mut Some((&mut rng, d.sigma))))
                .collect()
        }
    }
}

/// The thickness scale of period `p` of `r` inside a part at `scale`:
/// graded repeats scale linearly from 1 at the first period to
/// `chirp_scale` at the last.
pub(super) fn period_scale(r: &Repeat, p: u64, scale: f64) -> f64 {
    let steps = (r.count.max(2) - 1) as f64;
    scale * (1.0 + (r.chirp_scale - 1.0) * p as f64 / steps)
}

type Jitter<'r> = Option<(&'r mut StdRng, Option<Sigma>)>;

/// Expands `items` at thickness `scale`, drawing jitter when `jitter` is set.
/// Graded repeats scale linearly from 1 at the first period to `chirp_scale`
/// at the last.
fn emit(items: &[Item], scale: f64, jitter: &mut Jitter) -> Vec<Node> {
    let mut out = Vec::new();
    for item in items {
        match item {
            Item::Layer(l) => {
                let nominal = l.thickness_nm * scale;
                let thickness_nm = match jitter {
                    Some((rng, default)) => match l.sigma.or(*default) {
                        Some(s) if s.of(nominal) > 0.0 => {
                            let draw = Normal::new(nominal, s.of(nominal))
                                .expect("σ is finite and positive");
                            draw.sample(*rng).max(0.0)
                        }
                        _ => nominal,
                    },
                    None => nominal,
                };
                out.push(if l.incoherent {
                    Node::Incoherent {
                        medium: l.medium,
                        thickness_nm,
                    }
                } else {
                    Node::Layer {
                        medium: l.medium,
                        thickness_nm,
                    }
                });
            }
            Item::Repeat(r) => {
                if expands(r, jitter.is_some()) {
                    for p in 0..r.count {
                        out.extend(emit(&r.items, period_scale(r, p, scale), jitter));
                    }
                } else {
                    out.push(Node::Repeat {
                        count: r.count,
                        nodes: emit(&r.items, scale, jitter),
                    });
                }
            }
        }
    }
    out
}
