// The window's structure views without a GPU: MapView colouring by outside measures and groups,
// and the Structure panel's look (helper thread) and suspect choice, over MockRenderer.
#include <doctest/doctest.h>

#include <cmath>

#include "tests/approx.h"
#include "viewer/scene/map_feed.h"
#include "viewer/scene/map_view.h"
#include "viewer/panels/panel_structure.h"
#include "viewer/scene/renderer.h"
#include "viewer/cli/synthetic_collection.h"

using namespace kith;

namespace {
struct Rig {
  Collection collection = synthetic_collection(240, 4);
  MockRenderer renderer;
  StillFeed feed{collection.ids, rough_positions(collection)};
  MapView view{collection, renderer};
  Rig() {
    view.camera().set_viewport(1000, 700);
    view.set_snapshot(feed.latest());
    view.frame(0.f, 1000, 700);
  }
};
}  // namespace

TEST_CASE("map view colours by an outside measure and by groups, with legends") {
  Rig r;
  std::vector<float> m(r.collection.size(), 0.f);
  m[5] = 2.f;
  m[6] = std::nanf("");
  r.view.set_measure("suspect score", "", m);
  r.view.frame(0.f, 1000, 700);
  CHECK(r.view.options().colour_by.kind == ColourKind::kMeasure);
  CHECK(r.view.colour_title() == "suspect score");
  const Rgb top = r.view.palette().ramp(1.f), low = r.view.palette().ramp(0.f), muted = r.view.palette().muted;
  CHECK(r.view.colour_of(5).r == doctest::Approx(top.r));
  CHECK(r.view.colour_of(0).g == doctest::Approx(low.g));
  CHECK(r.view.colour_of(6).b == doctest::Approx(muted.b));
  // Five stops from 0 to the largest value, then the items with no value.
  REQUIRE(r.view.legend().size() == 6);
  CHECK(r.view.legend()[4].label == "2");
  CHECK(r.view.legend().back().label == "no value");
  CHECK(r.view.legend().back().count == 1);

  std::vector<int> g(r.collection.size(), -1);
  for (size_t i = 0; i < 100; ++i) g[i] = int(i % 2);
  r.view.set_groups("groups", g, {"group 1", "group 2"});
  r.view.frame(0.f, 1000, 700);
  CHECK(r.view.options().colour_by.kind == ColourKind::kGroup);
  REQUIRE(r.view.legend().size() == 3);
  CHECK(r.view.legend()[0].count == 50);
  CHECK(r.view.legend()[2].label == "no group");
  CHECK(r.view.legend()[2].count == r.collection.size() - 100);
  CHECK(r.view.colour_of(1).r == doctest::Approx(r.view.palette().category(1).r));
}

TEST_CASE("structure panel: a look on a helper thread, then choosing a suspect selects it and its neighbours") {
  Rig r;
  StructurePanel panel(r.collection, r.view);
  panel.look();
  CHECK(panel.busy());
  panel.finish_look();
  REQUIRE(panel.findings() != nullptr);
  const MapFindings& f = *panel.findings();
  CHECK(f.map_graph.n == r.collection.size());
  CHECK(f.have_suspects == !r.collection.tags.empty());
  REQUIRE(!f.suspects.ranking.empty());
  const int top = f.suspects.ranking.front();
  panel.choose_suspect(top);
  CHECK(r.view.selection().items().front() == top);
  CHECK(r.view.selection().size() == 11);  // the suspect and its 10 map neighbours
  for (size_t k = 0; k < 10; ++k) CHECK(r.view.selection().contains(f.map_graph.index[size_t(top) * f.map_graph.k + k]));
}

TEST_CASE("structure panel: the judgment-free reference map and the displacement from it") {
  Rig r;
  StructurePanel panel(r.collection, r.view);
  panel.fit_reference();
  panel.finish_reference();
  const Displacement* d = panel.displacement();
  REQUIRE(d != nullptr);
  REQUIRE(d->distance.size() == r.collection.size());
  // The still map is not the fitted one, so items moved; the ranking is by distance.
  CHECK(d->distance[size_t(d->ranking.front())] >= d->distance[size_t(d->ranking.back())]);
  CHECK(d->alignment.scale > 0.0);
}
