//! Resolving material names to dispersion models: the scene's own
//! `materials` first, then the built-in library.

use std::collections::HashMap;

use serde_json::Value;

use super::Loader;
use super::aniso::{self, Crystal, CrystalKind};
use super::json::{Obj, number, show};
use crate::error::{Error, Result};
use crate::materials::{Dispersion, MixingRule, NkTable, Oscillator, library};

/// A medium used by the scene.
#[derive(Debug, Clone)]
pub struct Medium {
    /// Name as written in the scene.
    pub name: String,
    /// Key path for error messages (`materials.hi` or the built-in name).
    pub key: String,
    /// Its index model.
    pub dispersion: Dispersion,
    /// Wavelengths (nm) where the model's source vouches for it: a built-in
    /// material's range, the overlap of a mixture's built-in parts; `None`
    /// for models the scene defines itself.
    pub valid_nm: Option<(f64, f64)>,
    /// Where the scene first uses it, e.g. `stack[0].material`.
    pub used_at: String,
}

/// A model with the range its source vouches for.
type Vouched = (Dispersion, Option<(f64, f64)>);

pub(super) struct Registry<'a> {
    user: Option<Obj<'a>>,
    load: &'a Loader<'a>,
    media: Vec<Medium>,
    by_name: HashMap<String, usize>,
    crystals: Vec<Crystal>,
}

const MODEL_KEYS: &[&str] = &["n", "cauchy", "sellmeier", "table", "drude_lorentz", "mix"];

impl<'a> Registry<'a> {
    pub fn new(materials: Option<&'a Value>, load: &'a Loader<'a>) -> Result<Self> {
        let user = materials.map(|v| Obj::new(v, "materials")).transpose()?;
        Ok(Registry {
            user,
            load,
            media: Vec::new(),
            by_name: HashMap::new(),
            crystals: Vec::new(),
        })
    }

    /// When `name` is an anisotropic material of the scene (used at `key`):
    /// its index among the crystals, its kind and the medium of its first
    /// principal index. Its components (each a material name or an inline
    /// model) become media of their own.
    pub fn crystal(
        &mut self,
        name: &str,
        key: &str,
    ) -> Result<Option<(usize, CrystalKind, usize)>> {
        if let Some(i) = self.crystals.iter().position(|c| c.name == name) {
            let c = &self.crystals[i];
            return Ok(Some((i, c.kind, c.principal[0])));
        }
        let Some(v) = self.user.as_ref().and_then(|u| u.get(name)) else {
            return Ok(None);
        };
        if !aniso::is_crystal(v) {
            return Ok(None);
        }
        let mkey = format!("materials.{name}");
        let o = Obj::new(v, &mkey)?;
        o.only(&["uniaxial", "biaxial", "source", "note"])?;
        let (kind, model) = match (o.get("uniaxial"), o.get("biaxial")) {
            (Some(u), None) => (CrystalKind::Uniaxial, u),
            (None, Some(b)) => (CrystalKind::Biaxial, b),
            _ => {
                return Err(Error::invalid(
                    &mkey,
                    show(v),
                    "give uniaxial or biaxial, not both",
                ));
            }
        };
        let mkey = o.key(if kind == CrystalKind::Uniaxial {
            "uniaxial"
        } else {
            "biaxial"
        });
        let parts = Obj::new(model, &mkey)?;
        let names = aniso::components(kind);
        parts.only(names)?;
        let mut media = Vec::new();
        for part in names {
            let at = parts.key(part);
            let m = match parts.get(part) {
                None => return Err(parts.missing(part, "a material name or model")),
                Some(Value::String(other)) => self.resolve(other, &at)?,
                Some(inline) => {
                    let (dispersion, valid_nm) =
                        self.user_model(inline, &at, &[name.to_string()])?;
                    self.media.push(Medium {
                        name: format!("{name}.{part}"),
                        key: at.clone(),
                        dispersion,
                        valid_nm,
                        used_at: key.to_string(),
                    });
                    self.media.len() - 1
                }
            };
            media.push(m);
        }
        let principal = match kind {
            CrystalKind::Uniaxial => [media[0], media[0], media[1]],
            CrystalKind::Biaxial => [media[0], media[1], media[2]],
        };
        self.crystals.push(Crystal {
            name: name.to_string(),
            key: format!("materials.{name}"),
            kind,
            principal,
        });
        Ok(Some((self.crystals.len() - 1, kind, principal[0])))
    }

    /// Index of the medium called `name`, used at `key`.
    pub fn resolve(&mut self, name: &str, key: &str) -> Result<usize> {
        if let Some(&i) = self.by_name.get(name) {
            return Ok(i);
        }
        let ((dispersion, valid_nm), mkey) = self.dispersion(name, key, &mut Vec::new())?;
        self.media.push(Medium {
            name: name.to_string(),
            key: mkey,
            dispersion,
            valid_nm,
            used_at: key.to_string(),
        });
        self.by_name.insert(name.to_string(), self.media.len() - 1);
        Ok(self.media.len() - 1)
    }

    /// The media and the anisotropic materials.
    pub fn into_parts(self) -> (Vec<Medium>, Vec<Crystal>) {
        (self.media, self.crystals)
    }

    fn dispersion(
        &self,
        name: &str,
        key: &str,
        chain: &mut Vec<String>,
    ) -> Result<(Vouched, String)> {
        if let Some(v) = self.user.as_ref().and_then(|u| u.get(name)) {
            let mkey = format!("materials.{name}");
            if aniso::is_crystal(v) {
                return Err(Error::invalid(
                    key,
                    name,
                    "is anisotropic: it can only be the material of a layer of `stack` \
                     (the incident medium, the substrate, mixtures, components and coatings \
                     need an isotropic material)",
                ));
            }
            if chain.iter().any(|c| c == name) {
                return Err(Error::invalid(mkey, name, "a mixture refers to itself"));
            }
            chain.push(name.to_string());
            let d = self.user_model(v, &mkey, chain)?;
            chain.pop();
            return Ok((d, mkey));
        }
        match library::find(name) {
            Some(m) => Ok(((m.dispersion, Some(m.valid_nm)), name.to_string())),
            None => Err(Error::UnknownMaterial {
                key: key.to_string(),
                name: name.to_string(),
            }),
        }
    }

    fn user_model(&self, v: &Value, key: &str, chain: &[String]) -> Result<Vouched> {
        let o = Obj::new(v, key)?;
        o.only(&[
            "n",
            "k",
            "cauchy",
            "sellmeier",
            "table",
            "drude_lorentz",
            "mix",
            "host",
            "guest",
            "fraction",
            "source",
        ])?;
        let present: Vec<&str> = MODEL_KEYS
            .iter()
            .copied()
            .filter(|k| o.get(k).is_some())
            .collect();
        let k = o.f64("k")?.unwrap_or(0.0);
        let mut valid_nm = None;
        let d = match present.as_slice() {
            ["n"] => Dispersion::Constant {
                n: o.req_f64("n")?,
                k,
            },
            ["cauchy"] => {
                let c = Obj::new(&o.map["cauchy"], o.key("cauchy"))?;
                c.only(&["a", "b", "c"])?;
                Dispersion::Cauchy {
                    a: c.req_f64("a")?,
                    b: c.f64("b")?.unwrap_or(0.0),
                    c: c.f64("c")?.unwrap_or(0.0),
                    k,
                }
            }
            ["sellmeier"] => {
                let s = Obj::new(&o.map["sellmeier"], o.key("sellmeier"))?;
                s.only(&["a", "b", "c"])?;
                let list = |name: &str| -> Result<Vec<f64>> {
                    let path = s.key(name);
                    match s.get(name) {
                        Some(Value::Array(xs)) => xs
                            .iter()
                            .enumerate()
                            .map(|(i, x)| number(x, &format!("{path}[{i}]")))
                            .collect(),
                        Some(other) => Err(Error::invalid(
                            path,
                            show(other),
                            "expected a list of numbers",
                        )),
                        None => Err(s.missing(name, "a list of numbers")),
                    }
                };
                let (b, c) = (list("b")?, list("c")?);
                if b.len() != c.len() || b.is_empty() {
                    return Err(Error::invalid(
                        s.key("c"),
                        show(&s.map["c"]),
                        "needs as many terms as `b` (at least one)",
                    ));
                }
                Dispersion::Sellmeier {
                    a: s.f64("a")?.unwrap_or(1.0),
                    terms: b.into_iter().zip(c).collect(),
                    k,
                }
            }
            ["table"] => {
                let path = o.str("table")?.unwrap_or_default();
                let text =
                    (self.load)(path).map_err(|why| Error::invalid(o.key("table"), path, why))?;
                Dispersion::Table(NkTable::from_csv(path, &text).map_err(|e| e.within(key))?)
            }
            ["drude_lorentz"] => drude_lorentz(&o.map["drude_lorentz"], &o.key("drude_lorentz"))?,
            ["mix"] => {
                let rule = match o.str("mix")? {
                    Some("bruggeman") => MixingRule::Bruggeman,
                    Some("maxwell_garnett") => MixingRule::MaxwellGarnett,
                    other => {
                        return Err(Error::invalid(
                            o.key("mix"),
                            other.unwrap_or(""),
                            "expected \"bruggeman\" or \"maxwell_garnett\"",
                        ));
                    }
                };
                let part = |role: &str| -> Result<Vouched> {
                    let name = o
                        .str(role)?
                        .ok_or_else(|| o.missing(role, "a material name"))?;
                    Ok(self.dispersion(name, &o.key(role), &mut chain.to_vec())?.0)
                };
                let ((host, host_nm), (guest, guest_nm)) = (part("host")?, part("guest")?);
                valid_nm = match (host_nm, guest_nm) {
                    (Some(a), Some(b)) => Some((a.0.max(b.0), a.1.min(b.1))),
                    (a, b) => a.or(b),
                };
                Dispersion::Mixture {
                    rule,
                    host: Box::new(host),
                    guest: Box::new(guest),
                    fraction: o
                        .f64("fraction")?
                        .ok_or_else(|| o.missing("fraction", "the guest's volume fraction 0–1"))?,
                }
            }
            _ => {
                return Err(Error::invalid(
                    key,
                    show(v),
                    format!("give exactly one model: {}", MODEL_KEYS.join(", ")),
                ));
            }
        };
        d.validate().map_err(|e| e.within(key))?;
        Ok((d, valid_nm))
    }
}

fn drude_lorentz(v: &Value, key: &str) -> Result<Dispersion> {
    let o = Obj::new(v, key)?;
    o.only(&[
        "eps_inf",
        "plasma_ev",
        "drude_strength",
        "drude_damping_ev",
        "oscillators",
    ])?;
    let oscillators = match o.get("oscillators") {
        None => Vec::new(),
        Some(Value::Array(xs)) => xs
            .iter()
            .enumerate()
            .map(|(i, x)| {
                let p = Obj::new(x, format!("{}[{i}]", o.key("oscillators")))?;
                p.only(&["strength", "energy_ev", "damping_ev"])?;
                Ok(Oscillator {
                    strength: p.req_f64("strength")?,
                    energy_ev: p.req_f64("energy_ev")?,
                    damping_ev: p.req_f64("damping_ev")?,
                })
            })
            .collect::<Result<_>>()?,
        Some(other) => {
            return Err(Error::invalid(
                o.key("oscillators"),
                show(other),
                "expected a list",
            ));
        }
    };
    Ok(Dispersion::DrudeLorentz {
        eps_inf: o.f64("eps_inf")?.unwrap_or(1.0),
        plasma_ev: o.req_f64("plasma_ev")?,
        drude_strength: o.f64("drude_strength")?.unwrap_or(1.0),
        drude_damping_ev: o.req_f64("drude_damping_ev")?,
        oscillators,
    })
}
