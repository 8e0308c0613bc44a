//go:build js && wasm

package page

// Workers is the number of compute workers, so that a view can split its work into about
// as many blocks as there are workers to take them.
func (j *jobs) Workers() int { return j.pool.Size() }
