// Card spacing: moves rectangles ("cards", e.g. pictures on a poster) centred at given 2-D places
// until no two overlap, while each stays close to its place so that neighbourhoods survive.
//
//   1. Scale: the places are scaled about their centre (one factor for both axes, so the
//      arrangement's shape is kept) by the smaller of two factors: the one that makes the median
//      distance from a place to its nearest other place `spread` card sides (no more room than
//      needed), and the one that makes the cards cover `fill` of the places' bounding box (the
//      empty space of a map with well separated groups does not shrink every card).
//   2. Push and pull (`rounds` rounds): every pair of cards that overlaps (with `gap` added to both
//      sides) is pushed apart along the line between their centres just far enough to clear, each
//      card by half (so the pair keeps its direction and the cards around keep their order; cards
//      on one spot part along an axis); the moves of a round are summed, then applied; then every
//      card moves `pull` of the way back towards its (scaled) place.
//   3. Settle: rounds of pushing alone until no pair overlaps; when `settle_rounds` rounds leave an
//      overlap, all cards spread out by 5% about their centre (which cannot create an overlap) and
//      settling goes on. The result never has two overlapping cards.
// Pairs are found through a uniform grid with cells the size of the largest card, so a round
// costs O(N) for cards of similar size. Deterministic (no random numbers); pure function, any thread.
#pragma once
#include <cstddef>
#include <string>
#include <vector>

#include "solver/base/points.h"

namespace kith {

struct CardSpacingOptions {
  double spread = 1.0;      // the median distance to the nearest place, in card sides; 0 = off (default: 1)
  double fill = 0.35;       // share of the places' bounding box the cards cover; 0 = off (default: 0.35)
  double gap = 0.06;        // free space kept between cards, in the units of the card sizes (default: 0.06)
  double pull = 0.05;       // share of the way back to its place a card moves each round (default: 0.05)
  int rounds = 300;         // rounds of push and pull (default: 300)
  int settle_rounds = 200;  // rounds of pushing alone before the cards spread by 5% (default: 200)
  bool IsValid(std::string* error) const;
};

struct CardSpacing {
  Points places;                 // N x 2: the places after the scaling of step 1 (where each card wanted to be)
  Points centres;                // N x 2: where the cards are, no two overlapping
  double scale = 1.0;            // the scaling of step 1
  size_t overlaps_at_start = 0;  // overlapping pairs at the scaled places
  int rounds = 0;                // rounds run in all
  int spreads = 0;               // times the cards spread by 5% while settling
};

// PLACES: N x 2; WIDTHS, HEIGHTS: N positive card sizes. Throws std::invalid_argument on sizes
// that do not match or options that are not valid.
CardSpacing space_cards(const Points& places, const std::vector<double>& widths, const std::vector<double>& heights,
                        const CardSpacingOptions& options = {});

// Pairs of cards closer than GAP (0: touching is allowed) on either axis; the same grid search.
size_t count_overlaps(const Points& centres, const std::vector<double>& widths, const std::vector<double>& heights,
                      double gap = 0.0);

}  // namespace kith
