// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

// gudhi_collapse times GUDHI's exact edge collapse path on a point cloud,
// for bench/homology.sh. It is built by that script, outside the
// repository, against Debian's libgudhi-dev headers (GUDHI 3.7.1; header
// only, with Boost):
//
//	c++ -std=c++17 -O3 -DNDEBUG bench/gudhi_collapse.cpp -o $TMPDIR/gudhi_collapse
//
// and never by go test or .ci/run.
//
// Usage: gudhi_collapse CLOUD.csv MAXDIM [THRESHOLD]
//
// CLOUD.csv has one point per line, coordinates separated by commas (no
// header). The 1-skeleton holds every pair at Euclidean distance at most
// THRESHOLD (computed in double precision); without THRESHOLD, or with
// 0, the threshold is the enclosing radius (min over points of the
// largest distance to another point) times 1 + 1e-9, so that no edge of
// that length is lost to rounding: at and above the enclosing radius the
// Rips complex is a cone and the barcode no longer changes. Then, as in
// GUDHI's Python SimplexTree.collapse_edges(nb_iterations=1):
//
//	Gudhi::collapse::flag_complex_collapse_edges(edges)
//	every vertex at filtration 0 and the remaining edges into a
//	Simplex_tree, expansion(MAXDIM+1)
//	Persistent_cohomology over Z/2, compute_persistent_cohomology(0)
//
// The barcode goes to stdout in the format of `crease barcode`: a header
// line "dim<TAB>lo<TAB>hi", then one bar per line, its dimension, birth
// and death as %.17g, "inf" for a bar that does not end (an essential
// class, or one alive at THRESHOLD), sorted by dimension, birth, death.
// Bars of dimension MAXDIM+1 are not computed. Zero-length bars are
// dropped by GUDHI (intervals of length <= 0).
//
// stderr gets one line with the sizes and the time of each phase.
//
// Exit status: 0 on success, 2 on a usage error or unreadable cloud.

#include <gudhi/Flag_complex_edge_collapser.h>
#include <gudhi/Persistent_cohomology.h>
#include <gudhi/Simplex_tree.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <limits>
#include <string>
#include <tuple>
#include <vector>

namespace {

// Simplex tree options with double filtration values (GUDHI's
// Simplex_tree_options_fast_persistence stores float) and keys for the
// persistence computation.
struct Options {
	typedef Gudhi::linear_indexing_tag Indexing_tag;
	typedef int Vertex_handle;
	typedef double Filtration_value;
	typedef std::uint32_t Simplex_key;
	static const bool store_key = true;
	static const bool store_filtration = true;
	static const bool contiguous_vertices = true;
};

using Tree = Gudhi::Simplex_tree<Options>;
using Field = Gudhi::persistent_cohomology::Field_Zp;
using Cohomology = Gudhi::persistent_cohomology::Persistent_cohomology<Tree, Field>;
using Edge = std::tuple<int, int, double>;

struct Cloud {
	std::size_t n = 0, dim = 0;
	std::vector<double> x;  // row-major, n*dim
	const double* row(std::size_t i) const { return x.data() + i * dim; }
};

[[noreturn]] void fail(const std::string& msg) {
	std::fprintf(stderr, "gudhi_collapse: %s\n", msg.c_str());
	std::exit(2);
}

// readCloud parses the CSV; every line must have the same number of
// finite numbers.
Cloud readCloud(const char* path) {
	std::ifstream in(path);
	if (!in) fail(std::string("cannot open ") + path);
	Cloud c;
	std::string line;
	std::size_t lineno = 0;
	while (std::getline(in, line)) {
		++lineno;
		if (!line.empty() && line.back() == '\r') line.pop_back();
		if (line.empty()) continue;
		std::size_t width = 0;
		const char* p = line.c_str();
		while (true) {
			char* end = nullptr;
			double v = std::strtod(p, &end);
			if (end == p || !std::isfinite(v))
				fail(std::string(path) + ":" + std::to_string(lineno) + ": not a finite number");
			c.x.push_back(v);
			++width;
			while (*end == ' ' || *end == '\t') ++end;
			if (*end == '\0') break;
			if (*end != ',')
				fail(std::string(path) + ":" + std::to_string(lineno) + ": want a comma");
			p = end + 1;
		}
		if (c.n == 0) c.dim = width;
		if (width != c.dim)
			fail(std::string(path) + ":" + std::to_string(lineno) + ": " + std::to_string(width) +
			     " coordinates, the first line has " + std::to_string(c.dim));
		++c.n;
	}
	if (c.n < 2) fail(std::string(path) + ": need at least 2 points");
	return c;
}

double dist(const Cloud& c, std::size_t i, std::size_t j) {
	const double* a = c.row(i);
	const double* b = c.row(j);
	double s = 0;
	for (std::size_t k = 0; k < c.dim; ++k) {
		double t = a[k] - b[k];
		s += t * t;
	}
	return std::sqrt(s);
}

// enclosingRadius returns min over i of max over j of d(i, j).
double enclosingRadius(const Cloud& c) {
	std::vector<double> far(c.n, 0.0);
	for (std::size_t i = 1; i < c.n; ++i)
		for (std::size_t j = 0; j < i; ++j) {
			double d = dist(c, i, j);
			far[i] = std::max(far[i], d);
			far[j] = std::max(far[j], d);
		}
	return *std::min_element(far.begin(), far.end());
}

double seconds(std::chrono::steady_clock::time_point a, std::chrono::steady_clock::time_point b) {
	return std::chrono::duration<double>(b - a).count();
}

}  // namespace

int main(int argc, char** argv) {
	if (argc < 3 || argc > 4) {
		std::fprintf(stderr, "usage: gudhi_collapse CLOUD.csv MAXDIM [THRESHOLD]\n");
		return 2;
	}
	char* end = nullptr;
	long maxdim = std::strtol(argv[2], &end, 10);
	if (*end != '\0' || maxdim < 0 || maxdim > 3) fail("MAXDIM must be 0..3");
	double threshold = 0;
	if (argc == 4) {
		threshold = std::strtod(argv[3], &end);
		if (*end != '\0' || !(threshold >= 0)) fail("THRESHOLD must be a number >= 0");
	}

	auto t0 = std::chrono::steady_clock::now();
	Cloud c = readCloud(argv[1]);
	auto t1 = std::chrono::steady_clock::now();
	bool enclosing = threshold == 0 || std::isinf(threshold);
	if (enclosing) threshold = enclosingRadius(c) * (1 + 1e-9);
	std::vector<Edge> edges;
	for (std::size_t i = 1; i < c.n; ++i)
		for (std::size_t j = 0; j < i; ++j) {
			double d = dist(c, i, j);
			if (d <= threshold) edges.emplace_back(int(j), int(i), d);
		}
	std::size_t before = edges.size();
	auto t2 = std::chrono::steady_clock::now();
	auto kept = Gudhi::collapse::flag_complex_collapse_edges(std::move(edges));
	auto t3 = std::chrono::steady_clock::now();

	Tree st;
	for (std::size_t v = 0; v < c.n; ++v) st.insert_simplex({int(v)}, 0.0);
	for (const auto& e : kept) st.insert_simplex({std::get<0>(e), std::get<1>(e)}, std::get<2>(e));
	std::size_t after = kept.size();
	std::vector<Edge>().swap(kept);
	st.expansion(int(maxdim) + 1);
	auto t4 = std::chrono::steady_clock::now();

	Cohomology pcoh(st);
	pcoh.init_coefficients(2);
	pcoh.compute_persistent_cohomology(0);
	auto t5 = std::chrono::steady_clock::now();

	std::vector<std::tuple<int, double, double>> bars;
	for (int d = 0; d <= maxdim; ++d)
		for (const auto& iv : pcoh.intervals_in_dimension(d)) bars.emplace_back(d, iv.first, iv.second);
	std::sort(bars.begin(), bars.end());
	std::string out = "dim\tlo\thi\n";
	char buf[96];
	for (const auto& b : bars) {
		double death = std::get<2>(b);
		if (std::isinf(death))
			std::snprintf(buf, sizeof buf, "%d\t%.17g\tinf\n", std::get<0>(b), std::get<1>(b));
		else
			std::snprintf(buf, sizeof buf, "%d\t%.17g\t%.17g\n", std::get<0>(b), std::get<1>(b), death);
		out += buf;
	}
	std::fwrite(out.data(), 1, out.size(), stdout);
	std::fprintf(stderr,
	             "gudhi_collapse: %zu points in R^%zu, threshold %.17g%s, %zu edges, %zu after collapse, "
	             "%zu simplices; read %.3f s, edges %.3f s, collapse %.3f s, expansion %.3f s, "
	             "persistence %.3f s\n",
	             c.n, c.dim, threshold, enclosing ? " (enclosing radius)" : "", before, after,
	             std::size_t(st.num_simplices()), seconds(t0, t1), seconds(t1, t2), seconds(t2, t3),
	             seconds(t3, t4), seconds(t4, t5));
	return 0;
}
