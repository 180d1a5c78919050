// Scenario files: defaults, the shipped scenarios, and clear errors for bad input.
#include <gtest/gtest.h>

#include <set>

#include "core/base/error.h"
#include "demo/scenario.h"

namespace budledger::demo {
namespace {

const std::string kScenarios = std::string(BUDLEDGER_SOURCE_DIR) + "/demo/scenarios/";

std::string errorOf(const std::string& text) {
  try {
    scenarioFromJsonText(text, "s.json");
  } catch (const InputError& e) {
    return e.what();
  }
  return "";
}

TEST(Scenario, ShippedScenariosLoad) {
  for (const char* name : {"demo.json", "hard.json", "tiny.json"}) {
    const Scenario s = loadScenario(kScenarios + name);
    EXPECT_FALSE(s.groups.empty()) << name;
    EXPECT_FALSE(positionsOf(s).empty()) << name;
  }
  const Scenario demo = loadScenario(kScenarios + "demo.json");
  ASSERT_EQ(demo.groups.size(), 2u);
  EXPECT_EQ(positionsOf(demo)[0].name, "ctrl-p1");
  EXPECT_GT(demo.groups[1].biology.medianRls, demo.groups[0].biology.medianRls);
}

TEST(Scenario, GroupsInheritAndOverrideBiology) {
  const Scenario s = scenarioFromJsonText(
      R"({"biology":{"cycle_min":80},"groups":[{"name":"a"},{"name":"b","biology":{"median_rls":40}}]})",
      "s.json");
  EXPECT_EQ(s.groups[0].biology.cycleMin, 80.0);
  EXPECT_EQ(s.groups[1].biology.cycleMin, 80.0);
  EXPECT_EQ(s.groups[0].biology.medianRls, BiologyParams{}.medianRls);
  EXPECT_EQ(s.groups[1].biology.medianRls, 40.0);
}

TEST(Scenario, RoundTripsThroughJson) {
  const Scenario s = loadScenario(kScenarios + "hard.json");
  const std::string once = scenarioToJsonText(s);
  EXPECT_EQ(scenarioToJsonText(scenarioFromJsonText(once, "again.json")), once);
}

TEST(Scenario, BadInputIsNamed) {
  EXPECT_NE(errorOf("{"), "");
  EXPECT_NE(errorOf(R"({"frmes": 10})").find("frmes: unknown key"), std::string::npos);
  EXPECT_NE(errorOf(R"({"frames": -3})").find("frames: -3 is outside"), std::string::npos);
  EXPECT_NE(errorOf(R"({"frames": 2.5})").find("expected an integer"), std::string::npos);
  EXPECT_NE(errorOf(R"({"device": {"flow": "sideways"}})").find("device.flow"), std::string::npos);
  EXPECT_NE(errorOf(R"({"groups": [{"name": "a"}, {"name": "a"}]})").find("used twice"),
            std::string::npos);
  EXPECT_NE(errorOf(R"({"groups": [{"name": "a", "biology": {"median": 3}}]})")
                .find("groups[0].biology.median: unknown key"),
            std::string::npos);
  EXPECT_NE(errorOf(R"({"biology": {"mother_diameter_um": 3.0}})").find("does not hold"),
            std::string::npos);
  EXPECT_EQ(errorOf("{}"), "");
  EXPECT_EQ(errorOf(R"({"frames": -3})").rfind("s.json: ", 0), 0u);  // names the file first
}

TEST(Scenario, PresetsAreValidAndHardOnesVary) {
  std::set<std::string> shapes, polarities;
  for (std::uint64_t seed = 1; seed <= 40; ++seed) {
    for (auto d : {Difficulty::Easy, Difficulty::Normal, Difficulty::Hard}) {
      const Scenario s = presetScenario(seed, d);
      EXPECT_NO_THROW(validate(s, "preset")) << seed;
      // What scenario.json records reads back as a valid scenario.
      EXPECT_NO_THROW(scenarioFromJsonText(scenarioToJsonText(s), "preset.json")) << seed;
    }
    const Scenario h = presetScenario(seed, Difficulty::Hard);
    shapes.insert(h.device.postShape);
    polarities.insert(h.optics.polarity);
    EXPECT_GE(h.device.pixelUm, 0.2);
    EXPECT_LE(h.device.pixelUm, 0.35);
  }
  EXPECT_EQ(shapes.size(), 3u);
  EXPECT_EQ(polarities.size(), 2u);
}

TEST(Scenario, ParameterTableListsEverySection) {
  const std::string t = parameterTableMarkdown();
  for (const char* key :
       {"`frames`", "`device.outlet_um`", "`optics.halo`", "`biology.median_rls`"})
    EXPECT_NE(t.find(key), std::string::npos) << key;
}

}  // namespace
}  // namespace budledger::demo
