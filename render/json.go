package render

import (
	"worth/compute"
)

// The JSON output follows the memo-language contract: amounts signed and
// unrounded, rates as fractions, null where a measure does not apply. Extra
// fields beyond the contract are added, never renamed.

type jsonReport struct {
	Title        string            `json:"title"`
	Currency     string            `json:"currency"`
	Rate         *jsonRate         `json:"rate"`
	Assumptions  []jsonAssumption  `json:"assumptions"`
	Alternatives []jsonAlternative `json:"alternatives"`
	Comparisons  []jsonComparison  `json:"comparisons"`
	Expectations []jsonExpectation `json:"expectations"`
	// amounts, replacements (tax.go)
	jsonFinance
	jsonAnalysis
	jsonRisks
	Revision *jsonRevision `json:"revision,omitempty"`
}

type jsonRate struct {
	Text       string  `json:"text"`
	Effective  float64 `json:"effective"`
	Conversion string  `json:"conversion,omitempty"`
}

type jsonAssumption struct {
	Name  string  `json:"name"`
	Value float64 `json:"value"`
	Line  int     `json:"line"`
}

type jsonAlternative struct {
	ID        string  `json:"id"`
	Name      string  `json:"name"`
	Life      *int    `json:"life"`
	FirstCost float64 `json:"first_cost"`
	Line      int     `json:"line"`
	// depreciation, loan (tax.go)
	jsonAltFinance
}

type jsonComparison struct {
	ID          string       `json:"id"`
	Rate        float64      `json:"rate"`
	RateText    string       `json:"rate_text,omitempty"`
	Conversion  string       `json:"rate_conversion,omitempty"`
	Horizon     string       `json:"horizon"`
	Years       *int         `json:"years"`
	DecideBy    string       `json:"decide_by"`
	Basis       string       `json:"basis"`
	Base        *string      `json:"base"`
	Recommended string       `json:"recommended"`
	RunnerUp    string       `json:"runner_up,omitempty"`
	Margin      float64      `json:"margin"`
	Tie         bool         `json:"tie"`
	CostOnly    bool         `json:"cost_only"`
	Results     []jsonResult `json:"results"`
	Steps       []jsonStep   `json:"steps,omitempty"`
	Warnings    []string     `json:"warnings"`
}

type jsonResult struct {
	Alternative        string    `json:"alternative"`
	PresentWorth       float64   `json:"present_worth"`
	AnnualWorth        float64   `json:"annual_worth"`
	FutureWorth        *float64  `json:"future_worth"`
	IRR                *float64  `json:"irr"`
	IRRRoots           []float64 `json:"irr_roots"`
	SignChanges        int       `json:"sign_changes"`
	BenefitCost        *float64  `json:"benefit_cost"`
	ModifiedBC         *float64  `json:"modified_benefit_cost"`
	Payback            *float64  `json:"payback_years"`
	DiscountedPayback  *float64  `json:"discounted_payback_years"`
	NetSavings         *float64  `json:"net_savings"`
	SIR                *float64  `json:"sir"`
	AIRR               *float64  `json:"airr"`
	PWFirstCosts       float64   `json:"pw_first_costs"`
	PWOtherCosts       float64   `json:"pw_other_costs"`
	PWBenefits         float64   `json:"pw_benefits"`
	PWDisbenefits      float64   `json:"pw_disbenefits"`
	PWSalvageAndResidu float64   `json:"pw_salvage_and_residual"`
	// the after-tax schedule (tax.go)
	jsonResultFinance
}

type jsonStep struct {
	Challenger    string    `json:"challenger"`
	Defender      string    `json:"defender"`
	DeltaPW       float64   `json:"delta_present_worth"`
	DeltaIRR      *float64  `json:"delta_irr"`
	DeltaRoots    []float64 `json:"delta_irr_roots"`
	DeltaBenefits float64   `json:"delta_benefits"`
	DeltaCosts    float64   `json:"delta_costs"`
	DeltaBC       *float64  `json:"delta_benefit_cost"`
	Accepted      bool      `json:"accepted"`
}

type jsonExpectation struct {
	Line   int    `json:"line"`
	Text   string `json:"text"`
	Passed bool   `json:"passed"`
	Detail string `json:"detail,omitempty"`
}

// JSON writes the report as the contract's JSON.
func JSON(rep *compute.Report) ([]byte, error) {
	out := jsonReport{Title: rep.Title, Currency: rep.Currency.Code,
		Assumptions: []jsonAssumption{}, Alternatives: []jsonAlternative{},
		Comparisons: []jsonComparison{}, Expectations: []jsonExpectation{}}
	if rep.Rate != nil {
		out.Rate = &jsonRate{Text: rep.Rate.Text, Effective: rep.Rate.Effective, Conversion: rep.Rate.Conversion}
	}
	for _, a := range rep.Assumptions {
		out.Assumptions = append(out.Assumptions, jsonAssumption{Name: a.Name, Value: a.Value, Line: a.Line})
	}
	for _, a := range rep.Alternatives {
		ja := jsonAlternative{ID: a.ID, Name: a.Name, FirstCost: a.FirstCost, Line: a.Line}
		if a.Life > 0 {
			l := a.Life
			ja.Life = &l
		}
		ja.jsonAltFinance = altFinanceJSON(a)
		out.Alternatives = append(out.Alternatives, ja)
	}
	for _, c := range rep.Comparisons {
		jc := jsonComparison{ID: c.ID, Rate: c.Rate.Effective, RateText: c.Rate.Text, Conversion: c.Rate.Conversion,
			Horizon: c.Horizon.Kind, DecideBy: c.DecideBy, Basis: c.Basis, Recommended: c.Recommended,
			RunnerUp: c.RunnerUp, Margin: c.Margin, Tie: c.Tie, CostOnly: c.CostOnly, Warnings: Warnings(c)}
		if jc.Warnings == nil {
			jc.Warnings = []string{}
		}
		if !c.Horizon.Perpetual() {
			y := c.Horizon.Years
			jc.Years = &y
		}
		if c.Base != "" {
			b := c.Base
			jc.Base = &b
		}
		for _, r := range c.Results {
			roots := r.IRRRoots
			if roots == nil {
				roots = []float64{}
			}
			jc.Results = append(jc.Results, jsonResult{
				Alternative: r.Alt.ID, PresentWorth: r.PW, AnnualWorth: r.AW, FutureWorth: r.FW,
				IRR: r.IRR, IRRRoots: roots, SignChanges: r.SignChanges, BenefitCost: r.BC, ModifiedBC: r.ModifiedBC,
				Payback: r.Payback, DiscountedPayback: r.DiscPayback, NetSavings: r.NetSavings, SIR: r.SIR, AIRR: r.AIRR,
				PWFirstCosts: -r.ByCategory[compute.Investment], PWOtherCosts: -r.ByCategory[compute.Operating],
				PWBenefits: r.ByCategory[compute.Benefits], PWDisbenefits: -r.ByCategory[compute.Disbenefits],
				PWSalvageAndResidu: r.ByCategory[compute.Recovery],
			})
			jc.Results[len(jc.Results)-1].jsonResultFinance = resultFinanceJSON(r)
		}
		for _, s := range c.Steps {
			roots := s.DeltaRoots
			if roots == nil {
				roots = []float64{}
			}
			jc.Steps = append(jc.Steps, jsonStep{Challenger: s.Challenger, Defender: s.Defender, DeltaPW: s.DeltaPW,
				DeltaIRR: s.DeltaIRR, DeltaRoots: roots, DeltaBenefits: s.DeltaBenefits, DeltaCosts: s.DeltaCosts,
				DeltaBC: s.DeltaBC, Accepted: s.Accepted})
		}
		out.Comparisons = append(out.Comparisons, jc)
	}
	for _, x := range rep.Expectations {
		out.Expectations = append(out.Expectations, jsonExpectation{Line: x.Line, Text: x.Text, Passed: x.Passed, Detail: x.Detail})
	}
	out.jsonFinance = financeJSON(rep)
	out.jsonAnalysis = analysisJSON(rep)
	out.jsonRisks = risksJSON(rep)
	out.Revision = revisionJSON(rep.Revision)
	// A NaN or infinity is written as null with a warning (jsonsafe.go).
	return encodeJSON(out)
}
