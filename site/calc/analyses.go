package calc

// Analyses lists what every calculator shows — the stage pages and the
// custom-circuit page alike — in the order of the panel's sections. An
// analysis with nothing to show for a circuit (a stage's design values,
// for circuit text) writes nothing. Adding an analysis is writing its file
// and adding it here; DEVELOPERS.md walks through it.
var Analyses []*Analysis

func init() {
	// Set here rather than in the declaration: the analyses' functions
	// may look the list up (byKey), which a declaration would make an
	// initialization cycle.
	Analyses = []*Analysis{
		&pinned,
		&ports,
		&gain,
		&loop,
		&closedLoop,
		&noiseAnalysis,
		&designValues,
		&devices,
		&engineNotes,
		&generated,
		&solveTarget,
		&designAids,
	}
}
