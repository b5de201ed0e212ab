//go:build !unix

package leftovers

// alive is true where kweigh cannot ask: nothing is swept there.
func alive(int) bool { return true }
