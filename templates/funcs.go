package templates

import (
	"math"
	"strconv"
	"strings"
	"text/template"
)

// Funcs are the helpers every table template may call:
//
//	sig N X     X to N significant digits, plain below 1e6 and from 1e-3 up,
//	            else in e-notation ("1.234e-05"); "" for NaN or ±Inf
//	fix N X     X with N decimals; "" for NaN or ±Inf
//	pct X       a probability as a percentage without trailing zeros (0.95 → "95")
//	g X         shortest round-trip form (strconv 'g', -1)
//	tex S       S with LaTeX's special characters escaped
//	wrap S      S escaped for a wrapping p{} column: {\raggedright S\par}
//	num S       a number for siunitx: "\num{S}", or "{--}" when S is empty
//	md S        S with Markdown table pipes escaped, or "–" when S is empty
func Funcs() template.FuncMap {
	return template.FuncMap{
		"sig": Sig,
		"fix": Fixed,
		"pct": Percent,
		"g":   func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) },
		"tex": TeXEscape,
		"wrap": func(s string) string {
			if s == "" {
				return ""
			}
			return `{\raggedright ` + TeXEscape(s) + `\par}`
		},
		"num": func(s string) string {
			if s == "" {
				return "{--}"
			}
			return `\num{` + s + `}`
		},
		"md": func(s string) string {
			if s == "" {
				return "–"
			}
			return strings.ReplaceAll(s, "|", `\|`)
		},
	}
}

// Sig formats x to n significant digits: fixed-point when 1e-3 ≤ |x| < 1e6
// (trailing zeros kept, so a column reads at one precision), e-notation
// otherwise. Digits before the decimal point are never rounded away
// (10576 stays 10576, not 10580). NaN and infinities give "".
func Sig(n int, x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	if n < 1 {
		n = 1
	}
	if x == 0 {
		return strconv.FormatFloat(0, 'f', n-1, 64)
	}
	// Round first, so 9.9996 to 4 digits becomes 10.00 with the right decimals.
	r, err := strconv.ParseFloat(strconv.FormatFloat(x, 'e', n-1, 64), 64)
	if err != nil {
		r = x
	}
	a := math.Abs(r)
	if a < 1e-3 || a >= 1e6 {
		return strconv.FormatFloat(r, 'e', n-1, 64)
	}
	decimals := n - 1 - int(math.Floor(math.Log10(a)))
	if decimals < 0 {
		return strconv.FormatFloat(x, 'f', 0, 64)
	}
	return strconv.FormatFloat(r, 'f', decimals, 64)
}

// Fixed formats x with d decimals; NaN and infinities give "".
func Fixed(d int, x float64) string {
	if math.IsNaN(x) || math.IsInf(x, 0) {
		return ""
	}
	s := strconv.FormatFloat(x, 'f', d, 64)
	if strings.Trim(s, "-0.") == "" {
		s = strings.TrimPrefix(s, "-") // no "-0.00"
	}
	return s
}

// Percent writes a probability as a percentage: 0.95 → "95", 0.975 → "97.5".
func Percent(p float64) string {
	if math.IsNaN(p) {
		return ""
	}
	return strconv.FormatFloat(math.Round(p*1e10)/1e8, 'f', -1, 64)
}

var texReplacer = strings.NewReplacer(
	`\`, `\textbackslash{}`,
	`{`, `\{`, `}`, `\}`,
	`$`, `\$`, `&`, `\&`, `#`, `\#`, `%`, `\%`, `_`, `\_`,
	`^`, `\textasciicircum{}`, `~`, `\textasciitilde{}`,
	`<`, `\textless{}`, `>`, `\textgreater{}`,
	// Characters fitseal's own notes use, which LaTeX's utf8 input does
	// not know by itself.
	"≤", `$\leq$`, "≥", `$\geq$`, "−", `$-$`, "±", `$\pm$`, "×", `$\times$`,
	"→", `$\to$`, "∞", `$\infty$`, "Δ", `$\Delta$`, "χ", `$\chi$`, "ξ", `$\xi$`,
	"λ", `$\lambda$`, "μ", `$\mu$`, "σ", `$\sigma$`, "ψ", `$\psi$`, "²", `$^2$`,
	"–", `--`, "—", `---`, "…", `\ldots{}`, "·", `$\cdot$`,
)

// TeXEscape escapes LaTeX's special characters so that a name such as
// "nitrate/MW_1 (50%)" prints as written, and writes the mathematical and
// Greek characters of fitseal's notes (≤, Δ, ξ, …) in LaTeX's terms.
func TeXEscape(s string) string { return texReplacer.Replace(s) }
