//go:build !amd64 || purego

package loudness

// bestKernels is the Go loops: there are no assembly kernels on this
// platform or in a purego build.
func bestKernels() kernelSet { return goKernels }
