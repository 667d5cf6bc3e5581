package site

import (
	"errors"
	"testing"
)

func TestMathML(t *testing.T) {
	for _, tc := range []struct{ in, want string }{
		{`x`, `<math><mi>x</mi></math>`},
		{`Z_0`, `<math><msub><mi>Z</mi><mn>0</mn></msub></math>`},
		{`T_{sc}`, `<math><msub><mi>T</mi><mi>sc</mi></msub></math>`},
		{`R C`, `<math><mrow><mi>R</mi><mi>C</mi></mrow></math>`},
		{`x^{2}_1`, `<math><msubsup><mi>x</mi><mn>1</mn><mn>2</mn></msubsup></math>`},
		{`a - 0.5`, `<math><mrow><mi>a</mi><mo>−</mo><mn>0.5</mn></mrow></math>`},
		{`\frac{1}{1 + T}`, `<math><mfrac><mn>1</mn><mrow><mn>1</mn><mo>+</mo><mi>T</mi></mrow></mfrac></math>`},
		{`\sqrt{x}`, `<math><msqrt><mi>x</mi></msqrt></math>`},
		{`\omega_1 \cdot \pi`, `<math><mrow><msub><mi>ω</mi><mn>1</mn></msub><mo>·</mo><mi>π</mi></mrow></math>`},
		{`\text{a < b}`, `<math><mtext>a &lt; b</mtext></math>`},
		{`<`, `<math><mo>&lt;</mo></math>`},
		{`\left( x \right)`, `<math><mrow><mo>(</mo><mi>x</mi><mo>)</mo></mrow></math>`},
		{`\cos \varphi`, `<math><mrow><mi>cos</mi><mo>` + "\u2061" + `</mo><mi>φ</mi></mrow></math>`},
		{`180°`, `<math><mrow><mn>180</mn><mo>°</mo></mrow></math>`},
		{`Ω`, `<math><mi>Ω</mi></math>`},
	} {
		got, err := MathML(tc.in, false)
		if err != nil || got != tc.want {
			t.Errorf("MathML(%q) = %q, %v\n want %q", tc.in, got, err, tc.want)
		}
	}
	got, _ := MathML("x", true)
	if got != `<math display="block"><mi>x</mi></math>` {
		t.Errorf("display formula: %q", got)
	}
}

func TestMathMLErrors(t *testing.T) {
	for _, tc := range []struct {
		in     string
		offset int
	}{
		{`{x`, 2},
		{`x}`, 1},
		{`_x`, 0},
		{`x_`, 2},
		{`x_1_2`, 3},
		{`\frac{a}`, 8},
		{`\bogus`, 0},
		{`\`, 0},
		{`\text x`, 6},
		{"a\x01", 1},
		{"\xff", 0},
	} {
		_, err := MathML(tc.in, false)
		var me *MathError
		if !errors.As(err, &me) || me.Offset != tc.offset {
			t.Errorf("MathML(%q): error %v, want one at byte %d", tc.in, err, tc.offset)
		}
	}
}
