// ObjectiveTerm: one unweighted part of the map's objective E(Y).
//
// Every term answers cost and gradient from one function:
//   cost = evaluate(Y, &G)   with G(i, c) = dE/dY(i, c), G resized to Y's shape and overwritten;
//   cost = evaluate(Y, nullptr)   cost only.
// Weights live outside the term (the blended objective owns them), so a live slider changes a
// number, not a term. Terms may cache work between calls (hence non-const). A term is used from
// one thread at a time; it may spread one evaluation over worker threads internally.
#pragma once
#include "solver/base/points.h"

namespace kith {

class ObjectiveTerm {
 public:
  virtual ~ObjectiveTerm() = default;
  virtual double evaluate(const Points& y, Points* gradient) = 0;
};

}  // namespace kith
