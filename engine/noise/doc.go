// Package noise computes the noise of a linear circuit at one output:
// the density against frequency, each source's share, and the rms over a
// band, referred back to an input when there is one.
//
// # Sources
//
// Every part that makes noise gives one or more sources, each uncorrelated
// with the others (Sources; circuit text in package zport/engine/circuit):
//
//	resistor R            thermal noise current 4kT/R in parallel (A²/Hz),
//	                      the Johnson–Nyquist density (J. B. Johnson,
//	                      Phys. Rev. 32, 97, 1928; H. Nyquist, Phys. Rev.
//	                      32, 110, 1928); none with noise=off
//	opamp en=, fce=       a voltage in series with the gain source's
//	                      input, density en²·(1 + fce/f)
//	opamp in=, fci=       a current from each input to gnd, in²·(1 + fci/f)
//	vnoise density=, fc=  a voltage in series, density²·(1 + fc/f)
//	inoise density=, fc=  a current, density²·(1 + fc/f)
//	inoise shot=I         shot noise 2qI (W. Schottky, Ann. Phys. 57, 1918
//	                      [memory])
//	inoise thermal=G      thermal noise 4kT·G of a conductance
//	bjt                   collector shot noise 2q·Ic from C to E, base shot
//	                      noise 2q·Ic/β from the internal base to E, and
//	                      rb's 4kT/rb (Ic = ic=, or gm·kT/q with gm=)
//	mos                   channel noise 4kT·γ·gm from D to S (γ = gamma=,
//	                      2/3 by default)
//
// with k and q the exact SI values (Boltzmann, Charge) and T the
// analysis temperature (P. R. Gray, P. J. Hurst, S. H. Lewis, R. G. Meyer,
// Analysis and Design of Analog Integrated Circuits, 5th ed., 2009, ch. 11
// [memory], for the transistors). An opamp's model resistances (rid, rcm,
// ro) and a transistor's (rπ, ro) are noiseless: their noise is the
// sources above.
//
// # Method
//
// With the circuit's equations M·x = b and the output y = dᵀx, source k
// entering as b_k has the transfer H_k = dᵀM⁻¹b_k = zᵀb_k, where z solves
// the adjoint system Mᵀz = d. One solve with the transpose, from the LU
// factors of M that the frequency's other analyses made anyway, gives the
// transfer from every source at once (R. Rohrer, L. Nagel, R. Meyer,
// L. Weber, "Computationally efficient electronic-circuit noise
// calculations", IEEE J. Solid-State Circuits 6(4), 1971 [memory]; S. W.
// Director, R. A. Rohrer, IEEE Trans. Circuit Theory 16(3), 1969
// [memory]). The output density is then Σ|H_k|²·S_k(f); the input-referred
// density is that over |G|², G the input source's transfer zᵀb_in.
//
//	a, _ := feedback.New(c, "U1", nil, gain)
//	a.Adjoint = []mna.Term{{I: mna.NodeVar(out), V: 1}}
//	n := noise.New(a.Sys, 300, inputRHS)
//	pt, _ := a.At(1e3)                         // pt.Adjoint is z
//	parts := make([]float64, len(n.Sources))
//	g := n.At(parts, pt.Adjoint, 1e3)          // V²/Hz per source, and G
//	band, _ := n.Band(a.AdjointAt, a.Sys.N, 10, 1e6)
//
// Band integrates over ln f with an adaptive 15-point Gauss–Kronrod rule
// that reports its own error estimate, on nodes of its own: the result
// depends on the band and the circuit, not on any sweep's grid. It also
// gives the equivalent noise bandwidth of G and its peak.
//
// NoiseGain is an opamp's noise gain 1/β (1 + Zf/Zi for the inverting
// family) from the same adjoint solution and the return ratio.
package noise
