package plume

// optionals hands out the optional values of a result (*float64, null in
// JSON when nil) from shared blocks: one allocation per optionalsBlock
// values instead of one each. A block is never grown in place, so a value
// handed out stays where it is. Not safe for concurrent use: each call
// that builds a result has its own (model.building). A nil *optionals
// allocates each value on its own.
type optionals struct{ block []float64 }

// optionalsBlock is the number of values per block: a demo screening (6
// receptors x 4 times, two methods) needs about 60.
const optionalsBlock = 64

// of returns a pointer to a copy of v.
func (o *optionals) of(v float64) *float64 {
	if o == nil {
		p := new(float64) // not &v, which would move v to the heap on every call
		*p = v
		return p
	}
	if len(o.block) == cap(o.block) {
		o.block = make([]float64, 0, optionalsBlock)
	}
	o.block = append(o.block, v)
	return &o.block[len(o.block)-1]
}

// scaled returns a copy of p multiplied by k (nil stays nil).
func (o *optionals) scaled(p *float64, k float64) *float64 {
	if p == nil {
		return nil
	}
	return o.of(*p * k)
}

// ratio is a/b, nil when b is not positive.
func (o *optionals) ratio(a, b float64) *float64 {
	if !(b > 0) {
		return nil
	}
	return o.of(a / b)
}

// times is f*c, nil with f.
func (o *optionals) times(f *float64, c float64) *float64 {
	if f == nil {
		return nil
	}
	return o.of(*f * c)
}

// building returns a copy of m that keeps the optional values of the
// result it builds in blocks of its own. A model is shared by the
// goroutines screening parts of a layer; each call builds with its own
// copy.
func (m *model) building() *model {
	c := *m
	c.opt = new(optionals)
	return &c
}
