// Copyright ©2026 The crease Authors. All rights reserved.
// Use of this source code is governed by a BSD-style
// license that can be found in the LICENSE file.

package overlap

import (
	"context"

	"gonum.org/v1/gonum/mat"

	"crease.dev/crease/internal/knn"
)

// DefaultK is the number of neighbours used when a K setting is zero; it
// is scikit-learn's default n_neighbors (common practice).
const DefaultK = 5

// KNNResult is the leave-one-out k-nearest-neighbour label agreement.
//
// For point i the neighbours are the K nearest other points (index i
// excluded, duplicates of point i kept), ordered by Euclidean distance and
// then by index.
type KNNResult struct {
	K int // neighbours used
	// Accuracy is the fraction of points whose neighbours' majority label
	// equals their own; a tie between labels goes to the smallest label
	// index. This is the leave-one-out accuracy of a uniform-weight k-NN
	// classifier (scikit-learn's KNeighborsClassifier with LeaveOneOut
	// gives the same value when no distance ties sit at the k-th place).
	Accuracy float64
	// Share is the mean over points of the fraction of their neighbours
	// that share their label.
	Share float64
	// ClassAccuracy[c] is Accuracy restricted to the points of class c
	// (NaN for an absent class).
	ClassAccuracy []float64
}

// KNNAgreement returns the leave-one-out k-NN label agreement of the
// labeled sample x with k neighbours (0 means [DefaultK]). k must be below
// the number of rows.
func KNNAgreement(ctx context.Context, x mat.Matrix, labels []int, k int) (*KNNResult, error) {
	s, err := newSample("knn agreement", x, labels, true)
	if err != nil {
		return nil, err
	}
	if k == 0 {
		k = DefaultK
	}
	if k < 1 || k >= s.n {
		return nil, errorf("knn agreement", -1, -1, "k = %d out of range 1..%d for %d rows", k, s.n-1, s.n)
	}
	g, err := knn.Search(ctx, x, k)
	if err != nil {
		return nil, err
	}
	return knnAgreement(g, s, k), nil
}

// knnAgreement evaluates the first k neighbours of each row of g.
func knnAgreement(g *knn.Graph, s *sample, k int) *KNNResult {
	res := &KNNResult{K: k, ClassAccuracy: make([]float64, s.classes)}
	votes := make([]int, s.classes)
	hit := make([]int, s.classes)
	var correct int
	var share float64
	for i, nb := range g.Index {
		for c := range votes {
			votes[c] = 0
		}
		for _, j := range nb[:k] {
			votes[s.labels[j]]++
		}
		best := 0
		for c, v := range votes {
			if v > votes[best] {
				best = c
			}
		}
		own := s.labels[i]
		if best == own {
			correct++
			hit[own]++
		}
		share += float64(votes[own]) / float64(k)
	}
	res.Accuracy = float64(correct) / float64(s.n)
	res.Share = share / float64(s.n)
	for c := range res.ClassAccuracy {
		res.ClassAccuracy[c] = float64(hit[c]) / float64(s.count[c])
	}
	return res
}
