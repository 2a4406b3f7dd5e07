//! Worked examples and exit codes shown at the end of `--help`. Every
//! example runs as written from the repository root (a test runs them all).

/// Exit codes, for `lamella --help`.
pub const EXIT_CODES: &str = "\
Exit codes, for every command:
  0    done
  1    a value that cannot be computed (the message names the point) or a
       file that cannot be written
  2    bad input (the message names the file, the key and the value)
  3    `match` ran but did not reach its target (the design and report are
       still written); `compare` found a point outside its tolerance (the
       report is still written)
  130  stopped by Ctrl-C; 143 by SIGTERM; 129 by SIGHUP (temporary output
       files are removed); `serve` runs until stopped so

Example:
  lamella color scenes/teal_label_foil.json";

/// `lamella spectrum`.
pub const SPECTRUM: &str = "\
Anisotropic and helicoidal layers (materials {\"uniaxial\": {\"ordinary\", \"extraordinary\"}} or
{\"biaxial\": {\"x\", \"y\", \"z\"}}; layer keys \"orientation\" and \"helix\") are computed by the
4×4 method. Handedness of light is named by the helix its electric field traces in space at
one instant: a left-handed helix reflects left-handed light (R_L) in its band.

--format json adds jones_r and jones_t, [angle][wavelength] lists of four [re, im] pairs in
row-major order (row = outgoing, column = incident) in the basis jones_basis: [\"p\", \"s\"] or,
with --basis circular, [\"L\", \"R\"]; for coherent stacks only (no incoherent layer,
substrate sheet or disorder).

Examples:
  lamella spectrum scenes/teal_label_foil.json -o foil-spectrum.csv
  lamella spectrum scenes/cnc_giftbox_window.json --basis circular -o cnc-circular.csv
  lamella spectrum scenes/kestrel_ink_print.json --layer-absorption -o print-absorption.csv";

/// `lamella field`.
pub const FIELD: &str = "\
Example (the s-polarized standing wave at 560 nm, normal incidence):
  lamella field scenes/quarter_wave_mirror.json --wavelength 560 --angle 0 --polarization s -o mirror-field.csv";

/// `lamella bands`.
pub const BANDS: &str = "\
Example (the stop-band edges at every angle, for s and p):
  lamella bands scenes/quarter_wave_mirror.json --stop-bands -o mirror-stop-bands.csv";

/// `lamella color`.
pub const COLOR: &str = "\
--polarization left|right: circularly polarized incident light; --analyzer left|right:
unpolarized light, the outgoing light seen through an ideal circular analyser. Handedness is
named by the helix the electric field traces in space at one instant.

Examples (colour seen through the film, under D50, as JSON; a left-handed chiral film
through a left circular analyser):
  lamella color scenes/violet_window_filter.json --side transmit --illuminant D50 --format json
  lamella color scenes/cnc_giftbox_window.json --analyzer left";

/// `lamella multiangle`: the scene's `coating` keys and the output keys.
pub const MULTIANGLE: &str = "\
Scene `coating` keys:
  binder             material name of the clear binder (lossless, n ≥ 1; e.g. define
                     {\"n\": 1.5} under `materials`)
  platelet           the platelet's layers, same syntax as `stack` (repeat, vary_nm,
                     sigma_nm / sigma_pct for an uneven core)
  disorder           {realizations, seed, sigma_nm | sigma_pct} for the platelet layers
  tilt_sigma_deg     Gaussian spread of platelet normals (density per solid angle
                     ∝ exp(−tilt²/2σ²)), 0.05–60; default 10
  tilt_density       instead: [[tilt_deg, weight], …] density per solid angle from 0°
  platelet_coverage  platelet area per unit coating area, 0–20; default 1
  background         \"black\" (default), \"white\", {\"reflectance\": 0–1} or
                     {\"reflectance\": [[nm, R], …]} (Lambertian)
  geometries         \"45\" (default: 45as-15, 45as15, 45as25, 45as45, 45as75, 45as110, the
                     in-plane set of ASTM E2194 and DIN 6175-2), a name
                     ILLUMINATIONasASPECULAR such as 45as15 or 25as40, or your own list of
                     names and objects, in order: {illumination_deg, aspecular_deg, name?}
                     (in-plane) or {illumination_deg, detection_deg,
                     detection_azimuth_deg, name?} (any pair; azimuth 0 = specular side,
                     180 = illumination side), e.g.
                     [\"45as15\", \"25as40\", {\"illumination_deg\": 45,
                      \"detection_deg\": 30, \"detection_azimuth_deg\": 90, \"name\": \"side\"}]
  notes              free text
Geometry names: 45as15 = illumination 45° from the normal, detection 15° from the
specular direction toward the normal (30° on the specular side); 45as-15 detects at
60°; 45as110 at 65° on the illumination side; 25as40 lights at 25° and detects at
15° on the illumination side. \"45\" is the only named set: list any other geometries.
Output per geometry: name, illumination_deg, aspecular_deg, in_plane, X, Y, Z, L, a, b,
C, h, srgb, hex, in_gamut, reflectance_factor (with --spectra). Also flop_index =
2.69 (L*15 − L*110)^1.11 / (L*45)^0.86 from 45as15, 45as45, 45as110 (left out,
with flop_note saying why, otherwise), hue_travel_deg (net hue change along the
listed geometries; left out for a single geometry) and
surface_gloss_Y (the binder surface's mirror reflection, excluded from every geometry).
Reflectance factor: radiance relative to a perfect white diffuser under the same
geometry (Y = 100 for the perfect diffuser).

Example:
  lamella multiangle scenes/pearl_compact_lid.json --geometries 45as15,45as45,45as110";

/// `lamella match`: how the search ends and what the exit code says.
pub const MATCH: &str = "\
Stopping: the search (differential evolution until its best has not fallen
by 1 % for 10 generations, then Nelder-Mead from the best few candidates,
restarted with fresh seeds) ends at the first of:
  reached         every goal within ΔE00 1 after a local refinement (and the
                  thickness limit held); not with --brightness-weight > 0,
                  which always leaves brightness to gain
  no_improvement  4 restarts in a row did not lower the best cost (the sum
                  of the goals' ΔE00, plus the brightness and limit terms)
                  by 0.05
  budget          --max-evals evaluations spent
The report's `stopped` says which, `evaluations` how many were spent.
Limits no design can meet are refused before the search: --max-total-nm
below the smallest total the vary_nm bounds allow (each variable in a repeat
group counted once per period), or a film target with L* outside 0-100.

Exit codes: 0 the target was reached; 3 it was not (the closest design is
still written to --out-scene and reported, with `reachable` false); 2 bad
input or a limit that cannot be met; 1 a colour that cannot be computed or a
file that cannot be written.

Helix pitches with `vary_nm` inside `helix` are variables too (pointer
`/stack/0/helix`, quantity `pitch`); --analyzer left|right sets the goal
for unpolarized light seen through a circular analyser.

Examples (a teal seen at 10°, the design written to matched.json; the pitch
that makes a chiral window green through a left analyser):
  lamella match scenes/teal_label_foil.json --target-lab 68.5,-82.9,4.2 --angle 10 --out-scene matched.json
  lamella match scenes/cnc_giftbox_window.json --target-lab 40.2,-67.9,28.8 --analyzer left --angle 0 --out-scene matched_window.json";

/// `lamella tolerance`.
pub const TOLERANCE: &str = "\
Exit codes: 0 done; 2 bad input; 1 a colour that cannot be computed (the
message names the sample and the angle or geometry) or a file that cannot be
written.

Every helix pitch draws its own error with the same sigma as the
thicknesses; an index error moves all principal indices of an anisotropic
layer together.

Example (2 % thickness and 0.01 index errors, 500 samples):
  lamella tolerance scenes/teal_label_foil.json --sigma-pct 2 --sigma-n 0.01 --samples 500";

/// `lamella fit`.
pub const FIT: &str = "\
Example (with the chart of measured against fitted spectra and residuals):
  lamella fit scenes/teal_label_foil.json --measured scenes/measured/teal_label_foil_sample.csv --out-scene fitted.json --chart fit.png";

/// `lamella sweep`.
pub const SWEEP: &str = "\
Example (an 8-point grid per layer, ΔE00 to a target):
  lamella sweep bench/design_5layer.json --grid 8 --target-lab 60,20,-30 -o sweep.jsonl";

/// `lamella render`.
pub const RENDER: &str = "\
Examples (a bottle in the softbox studio with a floor and its shadow; a filter pane before a
backlight, showing its pass band; a chiral window through left-handed circular-polarizer
glasses; a turntable as an animated PNG, the view sweeping from 10° to 40° elevation):
  lamella render scenes/teal_label_foil.json -o foil.png --shape bottle --size 400x400 --environment studio --floor 0.5
  lamella render scenes/violet_window_filter.json -o filter.png --shape pane --size 300x300 --orbit 25 --environment lighttable --view both
  lamella render scenes/cnc_giftbox_window.json -o window.png --size 200x200 --environment studio --analyzer left --caption
  lamella render scenes/preview_flip.json -o spin.png --size 160x160 --environment booth --turntable 12 --orbit-elevation 10:40";

/// `lamella materials`.
pub const MATERIALS: &str = "\
Examples (the library; the index of TiO2 film from 380 to 780 nm as CSV):
  lamella materials
  lamella materials tio2 --wavelengths 380:780:20 --format csv";

/// `lamella chart`.
pub const CHART: &str = "\
A scene whose left- and right-handed light differ (a helix layer) is shown
unpolarized and through a left and a right circular analyser side by side
(spectra: unpolarized, left- and right-circular curves; map: one panel per
incident handedness). Handedness is named by the helix the electric field
traces in space at one instant: a left-handed helix reflects left-handed
light at normal incidence. --analyzer left|right or --polarization left|right
shows one view only.

Examples:
  lamella chart scenes/teal_label_foil.json --kind angle-strip -o strip.png
  lamella chart scenes/teal_label_foil.json --scene scenes/chitin_lamellar_film.json --kind chromaticity -o compare.svg --observer CIE1931_2
  lamella chart scenes/cnc_giftbox_window.json --kind angle-strip -o chiral-strip.png";

/// `lamella report`.
pub const REPORT: &str = "\
Examples (a film; an effect-pigment coating):
  lamella report scenes/teal_label_foil.json -o foil-report/
  lamella report scenes/pearl_compact_lid.json -o pearl-report/";

/// `lamella compare`.
pub const COMPARE: &str = "\
Tolerance file (--tolerances): {\"formula\": \"de00\", \"limits\": {\"0\": 1.0, \"45\": 1.5},
\"default\": 2.0}: limits keyed by angle in degrees or by geometry name (\"45as15\");
`default` covers the points not listed (alone, every point; without it every
point in both must be listed); `formula` is de00 (default), de76, de94 or cmc. A
key naming no point in both files, two limits for one point, a negative limit or
an unknown key is refused (exit code 2).
Components are sample minus reference: ΔL* > 0 lighter, ΔC* > 0 more chromatic,
ΔH* > 0 a counterclockwise hue turn; the hue word names the a*b* axis the hue turns
toward (redder +a*, yellower +b*, greener -a*, bluer -b*).
Output keys (JSON): pass, formula, factors, points [{angle_deg | geometry,
delta_e00, delta_e76, delta_e94, delta_e_cmc, dL, dC, dH, da, db, description,
limit (with tolerances only), pass, reference, sample, check}], reference, sample,
illuminant, observer, side, polarization.

Exit codes: 0 every point passes; 3 a point is outside its tolerance; 2 bad input.

Example (the teal label foil's design against a measured production batch):
  lamella compare scenes/teal_label_foil.json scenes/measured/teal_label_foil_batch.csv --tolerances scenes/measured/teal_label_foil_tolerances.json";

/// `lamella serve`.
pub const SERVE: &str = "\
The page: the stack as a table (material, thickness, repeat count; add, remove,
reorder), a slider for every vary_nm layer, the colour strip with swatches, the
a*b* travel with L* against angle, spectra at chosen angles, a preview render, a
target colour with ΔE2000 per angle and a Match button; coatings show their
geometries. Light, observer, side, polarization and analyser as for `color`.

Security: loopback only unless --host ADDR --allow-remote; every API call needs
the token of the printed address; requests naming another Host or Origin are
refused; request bodies, grids, match budgets and render sizes are bounded.

Example (the teal foil's designer on a free port; open the address it prints):
  lamella serve scenes/teal_label_foil.json --port 0";
