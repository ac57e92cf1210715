// See engine_feed.h.
#include "viewer/window/engine_feed.h"

namespace kith {

namespace {
class EngineFeed : public MapFeed {
 public:
  EngineFeed(const Collection& c, const EngineOptions& o, std::vector<Judgment> j, Points start)
      : engine_(c, o, std::move(j), std::move(start)) {
    engine_.start();
  }
  ~EngineFeed() override { engine_.stop(); }
  uint64_t post(CommandBody body) override { return engine_.post(std::move(body)); }
  std::shared_ptr<const Snapshot> latest() const override { return engine_.latest(); }
  std::vector<Command> command_log() const override { return engine_.command_log(); }
  bool live() const override { return true; }

 private:
  Engine engine_;
};
}  // namespace

std::unique_ptr<MapFeed> make_engine_feed(const Collection& c, const EngineOptions& o, std::vector<Judgment> j,
                                          Points start) {
  return std::make_unique<EngineFeed>(c, o, std::move(j), std::move(start));
}

}  // namespace kith
