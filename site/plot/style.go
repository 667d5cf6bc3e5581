package plot

// CSS is the default look of every chart, the style sheet each SVG carries
// unless NoStyle is set. Colours come from CSS custom properties with
// fallbacks, so a page themes charts by setting the properties (for light
// and dark themes alike) and a standalone SVG still looks right:
//
//	--trace-z, --trace-z0, --trace-t, --trace-g   colours of the named trace classes
//	--zplot-c1 … --zplot-c6                         the palette used by trace position
//	--zplot-pin1 … --zplot-pin4                     pinned designs (class pin1 … pin4)
//	--zplot-marker, --zplot-hline, --zplot-bar      markers, reference lines, histogram bars
//	--zplot-bar-neg                                 bars of negative values (Bars)
//	--zplot-bg                                      the page background, for halos and the readout box
//
// Text, axes and grid follow currentColor. Every rule is scoped to .zplot.
// When the style sheet of an inline SVG applies, it applies to the whole
// page and comes after the page's own style sheets, so override these rules
// through the custom properties or with more specific selectors.
const CSS = `.zplot{font-family:system-ui,sans-serif;font-size:12px}` +
	`.zplot text{fill:currentColor;stroke:none}` +
	`.zplot .title{font-size:14px;font-weight:600}` +
	`.zplot .axis{fill:none;stroke:currentColor;stroke-opacity:.5}` +
	`.zplot .grid{fill:none;stroke:currentColor;stroke-opacity:.16}` +
	`.zplot .grid-minor{stroke-opacity:.07}` +
	`.zplot .tick,.zplot .axis-title{fill-opacity:.85}` +
	`.zplot .trace{fill:none;stroke-width:1.75px;stroke-linejoin:round;stroke-linecap:round}` +
	`.zplot .dashed{stroke-dasharray:7 4}` +
	`.zplot .trace.own-dash{stroke-width:1.4px}` +
	`.zplot .zc1{stroke:var(--zplot-c1,#2a6fb0)}` +
	`.zplot .zc2{stroke:var(--zplot-c2,#cf6a22)}` +
	`.zplot .zc3{stroke:var(--zplot-c3,#2e8c57)}` +
	`.zplot .zc4{stroke:var(--zplot-c4,#8d52b3)}` +
	`.zplot .zc5{stroke:var(--zplot-c5,#b08a1e)}` +
	`.zplot .zc6{stroke:var(--zplot-c6,#c4456f)}` +
	`.zplot .trace-z{stroke:var(--trace-z,#2a6fb0)}` +
	`.zplot .trace-z0{stroke:var(--trace-z0,#cf6a22)}` +
	`.zplot .trace-t{stroke:var(--trace-t,#2e8c57)}` +
	`.zplot .trace-g{stroke:var(--trace-g,#8d52b3)}` +
	`.zplot .trace-pin1{stroke:var(--zplot-pin1,#b8352b)}` +
	`.zplot .trace-pin2{stroke:var(--zplot-pin2,#157a7a)}` +
	`.zplot .trace-pin3{stroke:var(--zplot-pin3,#7a6400)}` +
	`.zplot .trace-pin4{stroke:var(--zplot-pin4,#5b5f66)}` +
	`.zplot .marker{fill:none;stroke:var(--zplot-marker,currentColor);stroke-opacity:.65;stroke-dasharray:3 3}` +
	`.zplot .hline{fill:none;stroke:var(--zplot-hline,currentColor);stroke-opacity:.55;stroke-dasharray:9 3 2 3}` +
	`.zplot .label{font-size:11px}` +
	`.zplot .halo{paint-order:stroke;stroke:var(--zplot-bg,Canvas);stroke-width:3px;stroke-linejoin:round}` +
	`.zplot .note{font-style:italic;fill-opacity:.7}` +
	`.zplot .bar{fill:var(--zplot-bar,#2a6fb0);fill-opacity:.45;stroke:var(--zplot-bar,#2a6fb0);stroke-width:1px}` +
	`.zplot .bar-neg{fill:var(--zplot-bar-neg,#cf6a22);stroke:var(--zplot-bar-neg,#cf6a22)}` +
	`.zplot .point{fill:var(--zplot-marker,currentColor)}` +
	`.zplot .point-pm{fill:var(--zplot-c3,#2e8c57)}` +
	`.zplot .point-gm{fill:var(--zplot-c2,#cf6a22)}` +
	`.zplot .minus-one{stroke:var(--zplot-c6,#c4456f)}` +
	`.zplot:focus{outline:none}` +
	`.zplot:focus-visible{outline:2px solid currentColor;outline-offset:2px}` +
	`.zplot .zcur{pointer-events:none}` +
	`.zplot .zcur-line{fill:none;stroke:currentColor;stroke-opacity:.6}` +
	`.zplot .zcur-dot{fill:var(--zplot-bg,Canvas);stroke-width:2px;stroke-dasharray:none}` +
	`.zplot .zcur-box{fill:var(--zplot-bg,Canvas);fill-opacity:.93;stroke:currentColor;stroke-opacity:.3}` +
	`.zplot .zcur-f{font-weight:600}`
