package surrogate

import "sort"

// materials holds generic printable materials (surrogate/REFERENCE.md §3.2). Typical
// values, verify for your filament: printed properties depend on process,
// orientation, humidity and strain rate. Z = across layers (meridional in
// an upright print), XY = in the layer plane (hoop).
var materials = map[string]Material{
	// PLA, fused filament. XY ≈ 2.0 GPa, Z ≈ 1.6 GPa, 1220–1310 kg/m³,
	// elastic limit ≈ 1.5 %, break across layers 0.9–6 % [published:
	// manufacturers' data sheets (ASTM D638)]; ν 0.33–0.36 [from memory
	// (verify)]. Allowable strain 1 %: below the elastic limit and the low
	// end of the across-layer break strain [common practice].
	"pla": {Name: "pla", ModulusAcross: 1.6e9, ModulusInLayer: 2.0e9, Poisson: 0.35, Density: 1240, AllowableStrain: 0.01},
	// PETG, fused filament. XY 2.0–3.0 GPa, ≈ 2.2 GPa bulk, 1250–1300 kg/m³
	// [published: data sheets]; Z taken at the low end of the range, 2.0 GPa
	// (no Z modulus listed); yield ≈ 3–5 %, ν ≈ 0.38 [from memory].
	// Allowable strain 2 %: below yield [common practice].
	"petg": {Name: "petg", ModulusAcross: 2.0e9, ModulusInLayer: 2.2e9, Poisson: 0.38, Density: 1270, AllowableStrain: 0.02},
	// TPU (Shore 95A), fused filament or powder bed. 24–247 MPa across AM
	// grades, strongly rate dependent [published: Haid, Duncan, Hart &
	// Foster, Characterisation of thermoplastic polyurethane (TPU) for
	// additive manufacturing; data sheets]; 95A ≈ 26 MPa, design strain
	// ≲ 10–20 %, ν 0.45–0.49 [from memory]; 1200–1250 kg/m³.
	// Allowable strain 10 %: low hysteresis [common practice].
	"tpu": {Name: "tpu", ModulusAcross: 26e6, ModulusInLayer: 26e6, Poisson: 0.48, Density: 1210, AllowableStrain: 0.10},
	// PA12, powder-bed fusion. 1.7–1.9 GPa with XY ≈ Z, 880–1010 kg/m³
	// (porosity), yield 10–11 %, ν 0.43–0.47 [published: data sheets].
	// Allowable strain 5 %: half the yield strain [common practice].
	"pa12": {Name: "pa12", ModulusAcross: 1.7e9, ModulusInLayer: 1.7e9, Poisson: 0.45, Density: 950, AllowableStrain: 0.05},
	// Standard SLA resin. ≈ 2.8 GPa, break ≈ 6 % [published: data sheets;
	// standard-resin values from memory]; 1100–1200 kg/m³,
	// ν 0.35–0.40 [from memory]. Allowable strain 2 %: a third of
	// the break strain, resins being brittle [common practice].
	"resin": {Name: "resin", ModulusAcross: 2.8e9, ModulusInLayer: 2.8e9, Poisson: 0.38, Density: 1150, AllowableStrain: 0.02},
}

// LookupMaterial returns the generic material of that name (pla, petg,
// tpu, pa12, resin): typical values, verify for your filament (see the
// table's comments for the sources of each value).
func LookupMaterial(name string) (Material, bool) {
	m, ok := materials[name]
	return m, ok
}

// MaterialNames returns the names of the generic materials, sorted.
func MaterialNames() []string {
	names := make([]string, 0, len(materials))
	for n := range materials {
		names = append(names, n)
	}
	sort.Strings(names)
	return names
}
