// The project summary the CLI and the headless workstation print: every
// engine run of a grown project, and the lifespans as the journal has them.
#include "core/export/summary.h"

#include <gtest/gtest.h>

#include "tests/core/store/fixture.h"

namespace budledger::exporting {
namespace {

TEST(Summary, ListsEveryRunOfAProjectGrownByTwoAnalyses) {
  const auto dir = store::testing::scratchDir("summary");
  {
    auto project = store::Project::create((dir / "p.budledger").string());
    EXPECT_NE(projectSummary(project).find("no engine run yet"), std::string::npos);
    const int a = project.addPosition({0, "a", "ctrl", 30, 64, 64});
    const int b = project.addPosition({0, "b", "cand", 30, 64, 64});
    store::RunRecording onlyA, onlyB;
    onlyA.positions = {a};
    onlyB.positions = {b};
    project.addEngineRun(
        {0, "", "0.1.0", "{}", ""},
        {{0, a, 0, 4, EventKind::Bud, 0.9}, {0, a, 0, 9, EventKind::Separation, 0.9}}, onlyA);
    project.addEngineRun({0, "", "0.1.0", "{}", ""}, {{0, b, 0, 6, EventKind::Bud, 0.8}}, onlyB);
    const std::string text = projectSummary(project);
    EXPECT_NE(
        text.find("engine run 1 (engine 0.1.0, 1 position): 2 proposals, 1 bud, 1 separation"),
        std::string::npos)
        << text;
    EXPECT_NE(
        text.find("engine run 2 (engine 0.1.0, 1 position): 1 proposals, 1 bud, 0 separation"),
        std::string::npos)
        << text;
    // Both runs' events stand: the second run replaced only position b's.
    EXPECT_NE(text.find("events now: 3 proposed"), std::string::npos) << text;
  }
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace budledger::exporting
