// Package circuit reads zport's circuit text: one part per line, positional
// by kind, with key=value options where a part has them.
//
//	# a non-inverting stage, invented example
//	vsource  Vin  in   gnd  1
//	opamp    U1   in   fb   out  a0=100k gbw=1M ro=50
//	resistor R1   fb   gnd  2k
//	resistor R2   out  fb   18k
//	port     out  out  gnd
//
// The lines:
//
//	resistor  NAME A B VALUE [noise=off]  resistance between A and B (> 0)
//	capacitor NAME A B VALUE              capacitance (> 0)
//	inductor  NAME A B VALUE              inductance (> 0; a short at DC)
//	vsource   NAME P N VALUE              V(P) − V(N) = VALUE
//	isource   NAME FROM TO VALUE          drives VALUE into TO, drawn from FROM
//	vcvs      NAME P N sense=CP,CN gain=K V(P) − V(N) = K·(V(CP) − V(CN))
//	vccs      NAME FROM TO sense=CP,CN gm=G  drives G·(V(CP) − V(CN)) into TO
//	ccvs      NAME P N sense=PART r=R     V(P) − V(N) = R·I(PART)
//	cccs      NAME FROM TO sense=PART gain=K drives K·I(PART) into TO
//	opamp     NAME PLUS MINUS OUT [a0=] [gbw=] [p2=] [rid=] [rcm=] [ro=] [cid=] [ccm=]
//	          [en=] [fce=] [in=] [fci=]
//	bjt       NAME C B E  ic= | gm=  [beta=] [va= | ro=] [ft=] [cmu=] [rb=]
//	mos       NAME D G S  gm= | id= vov=  [ro= | lambda=] [cgs=] [cgd=] [gmb=] [b=] [gamma=]
//	vnoise    NAME P N density=V [fc=]    noise voltage source (0 V otherwise)
//	inoise    NAME FROM TO density=I [fc=] | shot=I | thermal=G
//	                                      noise current source (open otherwise)
//	port      NAME A B                    a named port (A is the + side)
//
// A # starts a comment; blank lines are ignored; tokens are separated by
// spaces or tabs. Part names are unique and case-sensitive, node names are
// words of letters, digits and _, and gnd is the reference node. I(PART) is
// the current through PART from its first node to its second; it can be
// sensed on resistors, capacitors, inductors, voltage sources and the
// voltage-output controlled sources.
//
// The opamp is a differential input resistance rid between PLUS and MINUS
// (absent: infinite), a common-mode resistance rcm from each input to gnd
// (absent: infinite), and an internal voltage source of gain
// A(s) = a0/((1 + s/ω1)(1 + s/ω2)) driven by V(PLUS) − V(MINUS), with
// ω1 = 2π·gbw/a0 (absent gbw: no first pole) and ω2 = 2π·p2 (absent: none),
// behind an output resistance ro (absent: 0). a0 defaults to 100k. The
// input capacitances cid (between the inputs) and ccm (each input to gnd)
// sit in parallel with rid and rcm (absent: none).
//
// A bjt is the hybrid-π model at its bias point: gm = ic/VT with
// VT = kT/q at the analysis temperature (ParseWith; 300 K by default, with
// k and q the exact SI constants), or gm= given directly; rπ = beta/gm
// (beta defaults to 100); ro = va/ic, or ro= (absent: infinite);
// Cπ = gm/(2π·ft) − cmu (absent without ft=; negative is an error), Cμ = cmu
// from the internal base to C, and rb from B to the internal base (absent:
// 0). A mos is gm= or gm = 2·id/vov (square law), ro= or ro = 1/(lambda·id),
// cgs from G to S, cgd from G to D, and gmb·v(b, S) from D to S with the bulk
// b= (default gnd); gamma= is its channel-noise factor (default 2/3) for a
// noise analysis. Each transistor's transconductance is a controlled source
// that can be the reference element; Device holds the derived values.
//
// The dimensionless gains — an opamp's a0, the gain= of a vcvs or cccs —
// may be written in decibels, 20·log10 of the gain: a0=100dB is 1e5.
//
// Noise (package zport/engine/noise) comes from every resistor's thermal
// noise, unless its line says noise=off (a load or a model resistance that
// is not a resistor of the design); from an opamp's input voltage noise en
// (V/√Hz) and input current noise in (A/√Hz, one uncorrelated source at
// each input), each with a 1/f corner, fce and fci, so that the density is
// en·√(1 + fce/f); from each transistor (a bjt's collector shot noise
// 2q·Ic and base shot noise 2q·Ic/beta, with Ic = ic or gm·VT, and the
// thermal noise of its rb; a mos's channel noise 4kT·gamma·gm from D to S);
// and from the noise sources. A vnoise is a noise voltage
// of density V/√Hz in series between P and N, 0 V in every other analysis;
// an inoise is a noise current from FROM into TO, open in every other
// analysis, of density A/√Hz, or the shot noise √(2qI) of a DC current I
// (shot=), or the thermal noise √(4kTG) of a conductance G at the analysis
// temperature (thermal=; a channel's 4kTγ·gm is thermal=γ·gm). fc is the
// 1/f corner of a density. Densities and currents are ≥ 0, corners > 0.
//
// Values use package zport/engine/value: 4k7, 2.2e-9, 10p, 1µ0, with an
// optional unit symbol fitting the part (10kΩ, 4.7nF, 1MHz).
//
// Parse reports every problem it finds as an ErrorList of *Error, each with
// the 1-based line and column (in characters) of the offending token, and
// a hint where a usual slip is likely: an option or kind that is a typo of
// a known one ("did you mean beta=?"), sense=b e with a space for the
// comma, mega written as meg.
package circuit
