#pragma once
// Test projects with proposals, made through Project alone (no engine): a few
// positions with traps and one engine run of plausible events per trap.
#include <cstdint>
#include <filesystem>
#include <random>
#include <string>
#include <vector>

#include "core/store/project.h"

namespace budledger::store::testing {

struct FixtureOptions {
  int positions = 1;
  int traps = 3;
  int frames = 120;
  unsigned seed = 1;
  std::string prefix = "pos";
  std::string group = "control";
};

struct Fixture {
  std::vector<int> positions;  // ids
  std::int64_t run = 0;
};

// Proposals for one trap: bud/separation pairs every ~9 frames, a death in
// some traps; confidences in [0.5, 1].
std::vector<Event> plausibleProposals(int position, int trap, int frames, std::mt19937& rng);

Fixture makeFixture(Project& project, const FixtureOptions& options = {});

// A fresh, empty directory for one test, removed by the caller.
std::filesystem::path scratchDir(const std::string& name);

inline const Actor kTech{"tech01", "technician"};
inline const Actor kPi{"pi01", "pi"};

}  // namespace budledger::store::testing
