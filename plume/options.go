package plume

// Options tune Screen; the zero value is usable.
type Options struct {
	// Maximum number of finite-volume cells the numeric method may use;
	// 0 means DefaultCellBudget.
	CellBudget int
	// Engine version reported in Result.Engine.Version.
	EngineVersion string
	// Relative tolerance for numeric-vs-exact agreement; 0 means
	// DefaultNumericTolerance.
	NumericTolerance float64
	// Relative Domenico-vs-exact difference above which a caveat is raised;
	// 0 means DefaultDomenicoTolerance (10 %).
	DomenicoTolerance float64
}

// Defaults of Options.
const (
	DefaultCellBudget        = 600_000
	DefaultNumericTolerance  = 0.05
	DefaultDomenicoTolerance = 0.10
)

// WithDefaults fills the zero fields with the defaults.
func (o Options) WithDefaults() Options {
	if o.CellBudget <= 0 {
		o.CellBudget = DefaultCellBudget
	}
	if !(o.NumericTolerance > 0) {
		o.NumericTolerance = DefaultNumericTolerance
	}
	if !(o.DomenicoTolerance > 0) {
		o.DomenicoTolerance = DefaultDomenicoTolerance
	}
	if o.EngineVersion == "" {
		o.EngineVersion = "dev"
	}
	return o
}
