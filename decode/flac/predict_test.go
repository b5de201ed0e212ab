package flac

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"testing"
)

// randomBlock returns a block of n residual-like values of the given
// width, seeded so runs repeat.
func randomBlock(seed uint64, n int, bits uint) []int32 {
	rng := rand.New(rand.NewPCG(seed, 7))
	x := make([]int32, n)
	for i := range x {
		x[i] = int32(rng.Int64N(1<<bits) - 1<<(bits-1))
	}
	return x
}

// TestLPCUnrolledMatchesPlain cross-checks the loops written out per order
// against the plain double loop, at every order and at awkward lengths
// (the order itself, order + 1, a typical block), with coefficients and
// samples wide enough to need the 64-bit sums.
func TestLPCUnrolledMatchesPlain(t *testing.T) {
	for order := 1; order <= 32; order++ {
		for _, n := range []int{order, order + 1, order + 2, 4096} {
			coefs := randomBlock(uint64(order), order, 15)
			base := randomBlock(uint64(n*100+order), n, 24)
			got := append([]int32(nil), base...)
			want := append([]int32(nil), base...)
			restoreLPC(got, coefs, 14)
			restoreLPCPlain(want, coefs, 14)
			for i := range want {
				if got[i] != want[i] {
					t.Fatalf("order %d, length %d: sample %d = %d, plain loop %d", order, n, i, got[i], want[i])
				}
			}
		}
	}
}

// TestLPCKernelMatchesGo holds the assembly LPC loops (amd64) to their Go
// twins, the loops of lpc_orders.go and the plain loop above maxUnrolled,
// at every order, with samples and coefficients at the extremes of their
// widths so the 64-bit sums and the 32-bit wrap of the residual add are
// exercised too.
func TestLPCKernelMatchesGo(t *testing.T) {
	if !hasLPCAsm {
		t.Skip("no assembly LPC loop in this build")
	}
	for order := 1; order <= 32; order++ {
		for _, width := range []uint{16, 24, 32} {
			coefs := randomBlock(uint64(order+7), order, 15)
			base := randomBlock(uint64(order*31)+uint64(width), 1000, width)
			for _, shift := range []uint{0, 9, 15, 31} {
				want := append([]int32(nil), base...)
				if !restoreLPCUnrolled(want, coefs, shift) {
					restoreLPCPlain(want, coefs, shift)
				}
				kernels := []func([]int32, []int32, uint){lpcAsmWide}
				if order <= 8 {
					kernels = append(kernels, lpcRegsWide)
				}
				for k, kernel := range kernels {
					got := append([]int32(nil), base...)
					kernel(got, coefs, shift)
					for i := range want {
						if got[i] != want[i] {
							t.Fatalf("kernel %d, order %d, %d-bit, shift %d: sample %d = %d, Go loop %d", k, order, width, shift, i, got[i], want[i])
						}
					}
				}
			}
		}
	}
}

// TestFixedMatchesLPC checks the fixed predictors against the same
// polynomials run as LPC coefficients with shift 0 (RFC 9639, section
// 9.2.5, gives both forms).
func TestFixedMatchesLPC(t *testing.T) {
	for order := 0; order <= 4; order++ {
		base := randomBlock(uint64(order+40), 1000, 12)
		got := append([]int32(nil), base...)
		want := append([]int32(nil), base...)
		restoreFixed(got, order)
		c := fixedCoefficients[order]
		restoreLPCPlain(want, c[:order], 0)
		for i := range want {
			if got[i] != want[i] {
				t.Fatalf("order %d: sample %d = %d, as LPC %d", order, i, got[i], want[i])
			}
		}
	}
}

// TestLPCOrdersGenerated fails when lpc_orders.go is not what lpcgen.go
// writes (run go generate ./decode/flac).
func TestLPCOrdersGenerated(t *testing.T) {
	want, err := os.ReadFile("lpc_orders.go")
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	gen, err := os.ReadFile("lpcgen.go")
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(dir+"/lpcgen.go", gen, 0o644); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command("go", "run", "lpcgen.go")
	cmd.Dir = dir
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Skipf("go run lpcgen.go: %v\n%s", err, out)
	}
	got, err := os.ReadFile(dir + "/lpc_orders.go")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Error("lpc_orders.go is out of date: run go generate ./decode/flac")
	}
	wantAsm, err := os.ReadFile("lpc_amd64.s")
	if err != nil {
		t.Fatal(err)
	}
	gotAsm, err := os.ReadFile(dir + "/lpc_amd64.s")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(gotAsm, wantAsm) {
		t.Error("lpc_amd64.s is out of date: run go generate ./decode/flac")
	}
}

func BenchmarkRestoreLPC(b *testing.B) {
	for _, order := range []int{8, 12, 32} {
		b.Run(fmt.Sprint(order), func(b *testing.B) {
			coefs := randomBlock(1, order, 12)
			base := randomBlock(2, 4096, 16)
			x := make([]int32, len(base))
			b.SetBytes(int64(4 * len(x)))
			for b.Loop() {
				copy(x, base)
				restoreLPC(x, coefs, 12)
			}
		})
	}
}
