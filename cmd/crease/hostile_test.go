// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

//go:build linux

package main

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"
)

var updateHostile = flag.Bool("update-hostile", false, "rewrite the committed files of testdata/hostile from the builders")

const hostileDir = "../../testdata/hostile"

// A hostileFile is one file of the corpus. Small files are committed in
// testdata/hostile and checked against their builder; big ones are made
// at test time in a scratch folder.
type hostileFile struct {
	name  string
	big   bool
	build func(path string) error
}

func bytesFile(name string, b func() []byte) hostileFile {
	return hostileFile{name: name, build: func(path string) error { return os.WriteFile(path, b(), 0o644) }}
}

func onnxFile(name string, big bool, graph func() []chunk) hostileFile {
	return hostileFile{name: name, big: big, build: func(path string) error { return writeChunks(path, onnxModel(graph()...)...) }}
}

// traceFile is a damaged copy of base.json, the trace of mlp4.onnx on
// blobs4.csv.
func traceFile(name string, big bool, edit func(map[string]any)) hostileFile {
	return hostileFile{name: name, big: big, build: func(path string) error {
		base, err := os.ReadFile(filepath.Join(hostileDir, "base.json"))
		if err != nil {
			return err
		}
		b, err := damageTrace(base, edit)
		if err != nil {
			return err
		}
		return os.WriteFile(path, append(b, '\n'), 0o644)
	}}
}

const (
	mib = 1 << 20
	gib = 1 << 30
)

// hostileFiles is the corpus.
var hostileFiles = []hostileFile{
	// Models and samples that are fine, for the cases that need one.
	onnxFile("mlp4.onnx", false, func() []chunk { return mlpGraph(4, 3, 2, smallWeights) }),
	bytesFile("blobs4.csv", func() []byte {
		return labeledCSV(40, 4, blobs, func(i int) string { return string(rune('a' + i%2)) })
	}),
	bytesFile("blobs2.csv", func() []byte {
		return labeledCSV(40, 2, blobs, func(i int) string { return string(rune('a' + i%2)) })
	}),
	bytesFile("labels10.npy", func() []byte { return npyLabels(10) }),
	{name: "slow.csv", big: true, build: func(path string) error {
		return os.WriteFile(path, labeledCSV(6000, 4, blobs, func(i int) string { return string(rune('a' + i%2)) }), 0o644)
	}},

	// Finite values whose squares overflow.
	bytesFile("huge_values.csv", func() []byte { return []byte("0,0\n1e200,0\n0,1e200\n") }),
	bytesFile("huge_values.npy", func() []byte {
		return npyFloats(10, 4, func(i, j int) float64 {
			if i == 3 && j == 2 {
				return 1e200
			}
			return blobs(i, j)
		})
	}),
	onnxFile("huge_weights.onnx", false, func() []chunk {
		return mlpGraph(2, 2, 2, func(layer, i, j int) float64 { return 1e300 * smallWeights(layer, i, j) })
	}),

	// Reads that must be bounded before they allocate.
	{name: "sparse_3g.onnx", big: true, build: func(p string) error { return sparse(p, 3*gib) }},
	{name: "sparse_3g.csv", big: true, build: func(p string) error { return sparse(p, 3*gib) }},
	{name: "sparse_300m.json", big: true, build: func(p string) error { return sparse(p, 300*mib) }},

	// NPY headers that lie.
	bytesFile("npy_zero_rows.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (0, 4), }", nil, -1, 0)
	}),
	bytesFile("npy_negative.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (-3, 4), }", make([]byte, 96), -1, 0)
	}),
	bytesFile("npy_huge_shape.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (4611686018427387904, 4611686018427387904), }", make([]byte, 64), -1, 0)
	}),
	bytesFile("npy_short_len.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 4), }", make([]byte, 64), 4, 0)
	}),
	bytesFile("npy_cut_header.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 4), }", make([]byte, 64), -1, 30)
	}),
	bytesFile("npy_4gib.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (536870912, 1), }", make([]byte, 2000), -1, 0)
	}),
	bytesFile("npy_1e8x4.npy", func() []byte {
		return npyFile("{'descr': '<f8', 'fortran_order': False, 'shape': (100000000, 4), }", make([]byte, 4096), -1, 0)
	}),

	// Tiny ONNX files that imply gigabytes, and files whose memory
	// would grow faster than they do.
	onnxFile("adds16_w8192.onnx", false, func() []chunk { return addChain(8192, 16) }),
	onnxFile("adds3_w4096.onnx", false, func() []chunk { return addChain(4096, 3) }),
	onnxFile("outputs_32m.onnx", true, func() []chunk {
		return reluGraphWith(rep{[]byte{12<<3 | 2, 0}, 16 << 20})
	}),
	onnxFile("identity_1m.onnx", true, func() []chunk {
		node := flatten(onnxNode("Identity", "/id/Identity", []string{"x"}, []string{"x"}))
		return reluGraphWith(rep{node, 1_000_000})
	}),
	onnxFile("dims_250m.onnx", true, func() []chunk {
		return reluGraphWith(pbMsg(5, field{1, []chunk{rep{[]byte{1}, 250 << 20}}}, pbInt(2, 11), pbStr(8, "w")))
	}),
	onnxFile("attr_ints_70m.onnx", true, func() []chunk {
		attr := []chunk{pbStr(1, "axes"), field{8, []chunk{rep{[]byte{1}, 70_000_000}}}, pbInt(20, 7)}
		return reluGraphWith(onnxNode("Relu", "/r2/Relu", []string{"y"}, []string{"z"}, attr...))
	}),

	// Run time that grows with the input.
	onnxFile("relu_100k.onnx", true, func() []chunk { return reluChain(100_000) }),
	onnxFile("relu_1100.onnx", false, func() []chunk { return reluChain(1100) }),
	{name: "classes_100k.csv", big: true, build: func(p string) error { return os.WriteFile(p, classesCSV(100_000).lines(), 0o644) }},

	// Trace JSON that lies.
	traceFile("trace_negative_glued.json", false, func(t map[string]any) {
		firstStage(t)["glued"] = map[string]any{"total": -5, "within": -2, "cross": -3}
	}),
	traceFile("trace_betti_min.json", false, func(t map[string]any) {
		firstStage(t)["whole"].(map[string]any)["betti"].([]any)[0] = json.Number("-9223372036854775808")
	}),
	traceFile("trace_top_dim.json", false, func(t map[string]any) {
		t["settings"].(map[string]any)["top_dim"] = 100000
	}),
	bytesFile("trace_syntax.json", func() []byte { return []byte("{\n \"schema\": 1,\n \"stages\": [\n  {\"index\": 0,,}\n ]\n}\n") }),
	traceFile("trace_bars6000_a.json", true, manyBars(6000, 1)),
	traceFile("trace_bars6000_b.json", true, manyBars(6000, 2)),
}

// A hostileCase runs crease on files of the corpus. In args, @NAME is
// the path of corpus file NAME and {t} the case's scratch folder.
type hostileCase struct {
	name string
	args []string
	// exit is the documented status and msg a piece of the message on
	// stderr (or stdout for status 0).
	exit int
	msg  string
	// maxRSS bounds the child's peak resident memory, in MiB.
	maxRSS int64
	// before prepares {t}; after checks it.
	before func(t *testing.T, dir string)
	after  func(t *testing.T, dir string)
	// signal, when set, is sent once the run has started.
	signal syscall.Signal
	// stdin, when not empty, is repeated on stdin without end.
	stdin string
}

// endless repeats a pattern without end.
type endless struct {
	pat string
	at  int // offset in pat of the next byte
}

func (e *endless) Read(p []byte) (int, error) {
	n := 0
	for n < len(p) {
		k := copy(p[n:], e.pat[e.at:])
		n += k
		e.at = (e.at + k) % len(e.pat)
	}
	return n, nil
}

// A bound of 200 MiB covers the Go runtime, the binary and a refusal
// made before any large allocation (measured: 10–40 MiB).
const refusalRSS = 200

var hostileCases = []hostileCase{
	{name: "control trace", args: []string{"trace", "@mlp4.onnx", "@blobs4.csv"}, exit: 0, msg: "stage", maxRSS: refusalRSS},
	{name: "control compare", args: []string{"compare", "@base.json", "@base.json"}, exit: 0, msg: "", maxRSS: refusalRSS},

	{name: "barcode of 1e200", args: []string{"barcode", "@huge_values.csv"}, exit: 2, msg: "row 2, column 1", maxRSS: refusalRSS},
	{name: "npy features of 1e200", args: []string{"trace", "@mlp4.onnx", "@huge_values.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "row 4, column 3", maxRSS: refusalRSS},
	{name: "weights that reach 1e300", args: []string{"trace", "@huge_weights.onnx", "@blobs2.csv"}, exit: 2, msg: "stage 1", maxRSS: refusalRSS},

	{name: "3 GB sparse model", args: []string{"stages", "@sparse_3g.onnx"}, exit: 2, msg: "MaxFileBytes", maxRSS: refusalRSS},
	{name: "3 GB sparse model in trace", args: []string{"trace", "@sparse_3g.onnx", "@blobs4.csv"}, exit: 2, msg: "MaxFileBytes", maxRSS: refusalRSS},
	{name: "/dev/zero model", args: []string{"trace", "/dev/zero", "@blobs4.csv"}, exit: 2, msg: "not an ONNX file", maxRSS: refusalRSS},
	{name: "/dev/zero data", args: []string{"trace", "@mlp4.onnx", "/dev/zero"}, exit: 2, msg: "/dev/zero", maxRSS: refusalRSS},
	{name: "3 GB sparse data", args: []string{"trace", "@mlp4.onnx", "@sparse_3g.csv"}, exit: 2, msg: "sparse_3g.csv", maxRSS: refusalRSS},
	{name: "/dev/zero to forward", args: []string{"forward", "@mlp4.onnx", "/dev/zero"}, exit: 2, msg: "/dev/zero", maxRSS: refusalRSS},
	{name: "/dev/zero to barcode", args: []string{"barcode", "/dev/zero"}, exit: 2, msg: "/dev/zero", maxRSS: refusalRSS},
	{name: "300 MB sparse trace", args: []string{"report", "@sparse_300m.json"}, exit: 2, msg: "MaxJSONBytes", maxRSS: refusalRSS},
	{name: "/dev/zero trace", args: []string{"compare", "/dev/zero", "@base.json"}, exit: 2, msg: "/dev/zero", maxRSS: refusalRSS},

	// Endless streams on stdin: each reader stops at its byte limit, a
	// trace at its first byte when that is not '{'. A CSV sample's
	// cells are held as float64 (here 24 Mi cells, 195 MB, from 256 MiB
	// of text); the slice's growth and the collector's headroom (Go's
	// default GOGC of 100 lets the heap reach twice what is live) make
	// the bound four times the byte limit, plus the refusal's. A trace
	// stream is held in chunks: the byte limit plus the refusal's.
	{name: "endless CSV to barcode", args: []string{"barcode", "-"}, stdin: "0.1234567890123,0.9876543210987\n", exit: 2, msg: "MaxBytes", maxRSS: 4*256 + refusalRSS},
	{name: "endless CSV to trace", args: []string{"trace", "@mlp4.onnx", "-"}, stdin: "0.1234567890123,0.9876543210987,0.5,0.25,a\n", exit: 2, msg: "MaxCSVBytes", maxRSS: 4*256 + refusalRSS},
	{name: "endless spaces to report", args: []string{"report", "-"}, stdin: "\n", exit: 2, msg: "only white space", maxRSS: refusalRSS},
	{name: "endless trace to report", args: []string{"report", "-"}, stdin: "{\"schema\": 1, \"tool\": \"x\"   ", exit: 2, msg: "MaxJSONBytes", maxRSS: 256 + refusalRSS},
	{name: "endless text to report", args: []string{"report", "-"}, stdin: "crease", exit: 2, msg: "line 1, column 1", maxRSS: refusalRSS},

	{name: "npy zero rows", args: []string{"trace", "@mlp4.onnx", "@npy_zero_rows.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_zero_rows.npy", maxRSS: refusalRSS},
	{name: "npy negative shape", args: []string{"trace", "@mlp4.onnx", "@npy_negative.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_negative.npy", maxRSS: refusalRSS},
	{name: "npy huge shape", args: []string{"trace", "@mlp4.onnx", "@npy_huge_shape.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_huge_shape.npy", maxRSS: refusalRSS},
	{name: "npy short header length", args: []string{"trace", "@mlp4.onnx", "@npy_short_len.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_short_len.npy", maxRSS: refusalRSS},
	{name: "npy truncated header", args: []string{"trace", "@mlp4.onnx", "@npy_cut_header.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_cut_header.npy", maxRSS: refusalRSS},
	{name: "npy of 2 KB declaring 4 GiB", args: []string{"trace", "@mlp4.onnx", "@npy_4gib.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_4gib.npy", maxRSS: refusalRSS},
	{name: "npy declaring (10^8, 4)", args: []string{"trace", "@mlp4.onnx", "@npy_1e8x4.npy", "--labels", "@labels10.npy"}, exit: 2, msg: "npy_1e8x4.npy", maxRSS: refusalRSS},

	// MaxElements is 64 Mi elements: a model is refused before its
	// stages' weights (and, with --fuse, the products) pass it; the
	// three 4096×4096 stages, 384 MiB of float64, are held.
	{name: "16 broadcast adds of width 8192", args: []string{"stages", "@adds16_w8192.onnx"}, exit: 2, msg: "MaxElements", maxRSS: refusalRSS},
	{name: "fusing 3 adds of width 4096", args: []string{"stages", "--fuse", "@adds3_w4096.onnx"}, exit: 2, msg: "MaxElements", maxRSS: 600},
	{name: "32 MB of empty outputs", args: []string{"stages", "@outputs_32m.onnx"}, exit: 2, msg: "MaxNodes", maxRSS: refusalRSS},
	{name: "10^6 Identity nodes", args: []string{"stages", "@identity_1m.onnx"}, exit: 2, msg: "MaxNodes", maxRSS: refusalRSS},
	{name: "250 MiB of packed dims", args: []string{"stages", "@dims_250m.onnx"}, exit: 2, msg: "tensor rank above 32", maxRSS: 256 + refusalRSS},
	{name: "70 M attribute ints", args: []string{"stages", "@attr_ints_70m.onnx"}, exit: 2, msg: "MaxElements", maxRSS: refusalRSS},

	{name: "10^5 Relu nodes", args: []string{"stages", "@relu_100k.onnx"}, exit: 2, msg: "MaxNodes", maxRSS: refusalRSS},
	{name: "1100 Relu stages", args: []string{"trace", "@relu_1100.onnx", "@blobs2.csv"}, exit: 2, msg: "MaxStages", maxRSS: refusalRSS},
	{name: "10^5 classes", args: []string{"trace", "@mlp4.onnx", "@classes_100k.csv"}, exit: 2, msg: "MaxClasses", maxRSS: refusalRSS},

	{name: "negative glued count", args: []string{"report", "@trace_negative_glued.json", "--out", "{t}/r.html"}, exit: 2, msg: "do not add up", maxRSS: refusalRSS, after: noFiles},
	{name: "Betti number -2^63", args: []string{"compare", "@base.json", "@trace_betti_min.json", "--betti-tol", "0"}, exit: 2, msg: "negative", maxRSS: refusalRSS},
	{name: "top_dim 100000", args: []string{"report", "@trace_top_dim.json", "--out", "{t}/r.html"}, exit: 2, msg: "top_dim 100000 outside 0..3", maxRSS: refusalRSS, after: noFiles},
	{name: "JSON syntax error", args: []string{"report", "@trace_syntax.json"}, exit: 2, msg: "line 4, column 15", maxRSS: refusalRSS},
	{name: "6000-bar compare", args: []string{"compare", "@trace_bars6000_a.json", "@trace_bars6000_b.json"}, exit: 0, msg: "bottleneck", maxRSS: 400},

	{name: "memory budget too small", args: []string{"trace", "@mlp4.onnx", "@slow.csv", "--max-memory", "1MiB"}, exit: 2, msg: "--max-memory", maxRSS: refusalRSS},
	{name: "unwritable --csv", args: []string{"trace", "@mlp4.onnx", "@blobs4.csv", "--out", "{t}/t.json", "--csv", "{t}/file/long.csv"}, exit: 2, msg: "long.csv", maxRSS: refusalRSS,
		before: func(t *testing.T, dir string) {
			os.WriteFile(filepath.Join(dir, "t.json"), []byte("old"), 0o600)
			os.WriteFile(filepath.Join(dir, "file"), []byte("a file, not a folder"), 0o644)
		},
		after: func(t *testing.T, dir string) {
			if b, _ := os.ReadFile(filepath.Join(dir, "t.json")); string(b) != "old" {
				t.Errorf("t.json holds %q after a refused run, want its old content", b)
			}
			wantFiles(t, dir, "file", "t.json")
		}},
	{name: "output keeps its mode", args: []string{"trace", "@mlp4.onnx", "@blobs4.csv", "--out", "{t}/t.json"}, exit: 0, msg: "stage", maxRSS: refusalRSS,
		before: func(t *testing.T, dir string) { os.WriteFile(filepath.Join(dir, "t.json"), []byte("old"), 0o600) },
		after: func(t *testing.T, dir string) {
			fi, err := os.Stat(filepath.Join(dir, "t.json"))
			if err != nil || fi.Mode().Perm() != 0o600 || fi.Size() < 100 {
				t.Errorf("t.json: %v, %v; want the new trace with mode 0600", fi, err)
			}
			wantFiles(t, dir, "t.json")
		}},
	{name: "SIGTERM during a trace", args: []string{"trace", "@mlp4.onnx", "@slow.csv", "--top-dim", "2", "--per-class-cap", "-1", "--out", "{t}/t.json", "--csv", "{t}/l.csv"}, exit: 130, msg: "interrupted", maxRSS: 2000, signal: syscall.SIGTERM, after: noFiles},
	{name: "SIGINT during a trace", args: []string{"trace", "@mlp4.onnx", "@slow.csv", "--top-dim", "2", "--per-class-cap", "-1", "--out", "{t}/t.json"}, exit: 130, msg: "interrupted", maxRSS: 2000, signal: syscall.SIGINT, after: noFiles},
}

func noFiles(t *testing.T, dir string) { wantFiles(t, dir) }

// wantFiles checks that dir holds exactly the files names.
func wantFiles(t *testing.T, dir string, names ...string) {
	t.Helper()
	entries, _ := os.ReadDir(dir)
	var got []string
	for _, e := range entries {
		got = append(got, e.Name())
	}
	if !slices.Equal(got, names) {
		t.Errorf("files in the output folder: %v, want %v", got, names)
	}
}

// TestHostileCorpus checks that the committed files of testdata/hostile
// are what their builders write (with -update-hostile it rewrites them,
// base.json with the crease under test).
func TestHostileCorpus(t *testing.T) {
	if *updateHostile {
		bin := buildCrease(t)
		for _, f := range hostileFiles {
			if f.build != nil && !f.big && !strings.HasPrefix(f.name, "trace_") {
				if err := f.build(filepath.Join(hostileDir, f.name)); err != nil {
					t.Fatal(err)
				}
			}
		}
		cmd := exec.Command(bin, "trace", filepath.Join(hostileDir, "mlp4.onnx"), filepath.Join(hostileDir, "blobs4.csv"), "--out", filepath.Join(hostileDir, "base.json"))
		if out, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("%v: %s", err, out)
		}
		for _, f := range hostileFiles {
			if !f.big && strings.HasPrefix(f.name, "trace_") {
				if err := f.build(filepath.Join(hostileDir, f.name)); err != nil {
					t.Fatal(err)
				}
			}
		}
	}
	scratch := t.TempDir()
	for _, f := range hostileFiles {
		if f.big {
			continue
		}
		p := filepath.Join(scratch, f.name)
		if err := f.build(p); err != nil {
			t.Fatalf("%s: %v", f.name, err)
		}
		want, _ := os.ReadFile(p)
		got, err := os.ReadFile(filepath.Join(hostileDir, f.name))
		if err != nil || !bytes.Equal(got, want) {
			t.Errorf("testdata/hostile/%s differs from its builder (%v); run go test ./cmd/crease -run TestHostileCorpus -update-hostile", f.name, err)
		}
	}
}

// buildCrease builds the command into a temporary folder.
func buildCrease(t *testing.T) string {
	t.Helper()
	bin := filepath.Join(t.TempDir(), "crease")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0")
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	return bin
}

// TestHostile runs crease, as a child process, on every case of the
// corpus: each must end with its documented exit status and message,
// never a panic (status 3 and "internal error"), under its memory bound
// (the child's peak RSS from getrusage) and within a minute (a hang
// guard, not a speed test).
func TestHostile(t *testing.T) {
	if testing.Short() {
		t.Skip("builds the command and runs it on large files")
	}
	bin := buildCrease(t)
	big := t.TempDir()
	// The big files are made by a child (this test binary running
	// TestHostileBuild): a child's peak RSS as getrusage reports it
	// starts from this process's peak at the fork, which building them
	// here would raise.
	build := exec.Command(os.Args[0], "-test.run", "^TestHostileBuild$")
	build.Env = append(os.Environ(), "CREASE_HOSTILE_BUILD="+big)
	if out, err := build.CombinedOutput(); err != nil {
		t.Fatalf("making the big files: %v\n%s", err, out)
	}
	paths := map[string]string{"base.json": filepath.Join(hostileDir, "base.json")}
	for _, f := range hostileFiles {
		if f.big {
			paths[f.name] = filepath.Join(big, f.name)
		} else {
			paths[f.name] = filepath.Join(hostileDir, f.name)
		}
	}
	t.Logf("this process's peak memory (a floor of the children's): %s", vmHWM())
	for _, c := range hostileCases {
		t.Run(c.name, func(t *testing.T) {
			dir := t.TempDir()
			if c.before != nil {
				c.before(t, dir)
			}
			args := make([]string, len(c.args))
			for i, a := range c.args {
				if name, ok := strings.CutPrefix(a, "@"); ok {
					p, ok := paths[name]
					if !ok {
						t.Fatalf("no corpus file %s", name)
					}
					a = p
				}
				args[i] = strings.ReplaceAll(a, "{t}", dir)
			}
			ctx, cancel := context.WithTimeout(context.Background(), time.Minute)
			defer cancel()
			cmd := exec.CommandContext(ctx, bin, args...)
			var stdout, stderr bytes.Buffer
			cmd.Stdout, cmd.Stderr = &stdout, &stderr
			if c.stdin != "" {
				cmd.Stdin = &endless{pat: c.stdin}
			}
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			if c.signal != 0 {
				time.Sleep(300 * time.Millisecond)
				cmd.Process.Signal(c.signal)
			}
			err := cmd.Wait()
			if ctx.Err() != nil {
				t.Fatalf("still running after a minute: %s", stderr.String())
			}
			code := cmd.ProcessState.ExitCode()
			if err != nil && code < 0 {
				t.Fatalf("ended by %v", err)
			}
			out := stderr.String()
			if code == 0 {
				out = stdout.String() + out
			}
			if code != c.exit || !strings.Contains(out, c.msg) || strings.Contains(out, "internal error") {
				t.Errorf("exit %d, output %q; want exit %d and %q", code, clip(out), c.exit, c.msg)
			}
			if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
				rss := ru.Maxrss >> 10 // Linux reports KiB
				if rss > c.maxRSS {
					t.Errorf("peak RSS %d MiB, bound %d MiB", rss, c.maxRSS)
				}
				t.Logf("exit %d, peak RSS %d MiB, %v", code, rss, cmd.ProcessState.UserTime()+cmd.ProcessState.SystemTime())
			}
			if c.after != nil {
				c.after(t, dir)
			}
		})
	}
}

// clip shortens a long output for a test message.
func clip(s string) string {
	if len(s) > 600 {
		return s[:600] + fmt.Sprintf("… (%d bytes)", len(s))
	}
	return s
}

// vmHWM returns this process's peak resident set size as /proc reports
// it.
func vmHWM() string {
	b, _ := os.ReadFile("/proc/self/status")
	for _, l := range strings.Split(string(b), "\n") {
		if v, ok := strings.CutPrefix(l, "VmHWM:"); ok {
			return strings.TrimSpace(v)
		}
	}
	return "?"
}

// TestHostileBuild makes the big files of the corpus in the folder
// CREASE_HOSTILE_BUILD names, for TestHostile; without it, it does
// nothing.
func TestHostileBuild(t *testing.T) {
	dir := os.Getenv("CREASE_HOSTILE_BUILD")
	if dir == "" {
		t.Skip("run by TestHostile")
	}
	for _, f := range hostileFiles {
		if f.big {
			if err := f.build(filepath.Join(dir, f.name)); err != nil {
				t.Fatalf("%s: %v", f.name, err)
			}
		}
	}
}
