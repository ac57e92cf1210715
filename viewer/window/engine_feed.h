// The live feed: the engine (solver/live/engine.h) behind the MapFeed interface the window and
// the scene use. Kept apart from viewer/scene so the scene sees the engine only through its
// commands and snapshots. Construct and destroy on the main thread; post()/latest() from any.
#pragma once
#include <memory>
#include <vector>

#include "solver/live/engine.h"
#include "viewer/scene/map_feed.h"

namespace kith {

// The live engine over `collection`, started.
std::unique_ptr<MapFeed> make_engine_feed(const Collection& collection, const EngineOptions& options,
                                          std::vector<Judgment> judgments = {}, Points start = {});

}  // namespace kith
