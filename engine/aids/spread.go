package aids

import (
	"fmt"
	"math/rand/v2"

	"gonum.org/v1/gonum/stat/distuv"
)

// Distribution is how a Monte Carlo trial draws a part's value.
type Distribution int

const (
	// Uniform draws evenly between a spread's two limits.
	Uniform Distribution = iota
	// Normal draws from a normal distribution whose 3σ is the
	// tolerance: σ = tolerance/3 about the nominal value, so 99.73 % of
	// draws lie within the limits and the rest beyond them.
	Normal
)

func (d Distribution) String() string {
	if d == Normal {
		return "normal"
	}
	return "uniform"
}

// Spread says how one parameter varies: between the limits Lo and Hi (the
// corners, and the range of a uniform draw), or normally about Mu with
// standard deviation Sigma.
type Spread struct {
	Param     int // index in Model.Params
	Lo, Hi    float64
	Mu, Sigma float64
	// Tol is the relative tolerance of a passive part; 0 for a min–typ
	// spread.
	Tol float64
}

// Tolerance is the spread of a part with relative tolerance tol (0.01 for
// ±1 %): limits nominal·(1 ∓ tol), normal σ = nominal·tol/3.
func Tolerance(param int, nominal, tol float64) Spread {
	if !(nominal > 0) || !(tol > 0 && tol < 1) {
		panic(fmt.Sprintf("aids: Tolerance(%d, %g, %g): want nominal > 0 and 0 < tol < 1", param, nominal, tol))
	}
	return Spread{Param: param, Lo: nominal * (1 - tol), Hi: nominal * (1 + tol), Mu: nominal, Sigma: nominal * tol / 3, Tol: tol}
}

// MinTyp is the spread of an opamp's a0 or gbw given its guaranteed
// minimum and its typical value (the nominal): limits min and typ; a normal
// draw is centred on typ with min at −3σ, σ = (typ − min)/3, so values above
// typ occur as often as below.
func MinTyp(param int, min, typ float64) Spread {
	if !(min > 0) || !(typ >= min) {
		panic(fmt.Sprintf("aids: MinTyp(%d, %g, %g): want 0 < min ≤ typ", param, min, typ))
	}
	return Spread{Param: param, Lo: min, Hi: typ, Mu: typ, Sigma: (typ - min) / 3}
}

// draw returns one value drawn with d from src. A normal draw at or below
// zero (more than 3/tol standard deviations out) is drawn again.
func (s Spread) draw(d Distribution, src rand.Source) float64 {
	if d == Normal && s.Sigma > 0 {
		n := distuv.Normal{Mu: s.Mu, Sigma: s.Sigma, Src: src}
		for range 64 {
			if x := n.Rand(); x > 0 {
				return x
			}
		}
		return s.Mu
	}
	if s.Lo == s.Hi {
		return s.Lo
	}
	return distuv.Uniform{Min: s.Lo, Max: s.Hi, Src: src}.Rand()
}
