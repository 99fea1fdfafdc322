package analysis

// Check validates the read options themselves (units, rate, volume offset)
// before any file is read, so that a command line can refuse a bad option as
// a usage error; ReadCSV checks them again.
func (o ReadOptions) Check() error { return o.check() }
