#include "core/store/engine_run_entry.h"

#include <fmt/format.h>

#include <algorithm>
#include <nlohmann/json.hpp>

#include "core/base/sha256.h"
#include "core/store/sqlite.h"

namespace budledger::store {

std::string engineRunJson(const EngineRunValue& v) {
  nlohmann::json j;
  j["run"] = v.run;
  j["positions"] = v.positions;
  j["proposals"] = v.proposals;
  j["digest"] = v.digest;
  auto carried = nlohmann::json::array();
  for (const auto& [o, n] : v.carry.carried) carried.push_back({o, n});
  j["carried"] = std::move(carried);
  j["unmatched"] = v.carry.unmatched;
  return j.dump();
}

EngineRunValue parseEngineRunJson(std::string_view json) {
  try {
    const auto j = nlohmann::json::parse(json);
    EngineRunValue v;
    v.run = j.at("run").get<std::int64_t>();
    v.positions = j.at("positions").get<std::vector<int>>();
    v.proposals = j.at("proposals").get<std::int64_t>();
    v.digest = j.at("digest").get<std::string>();
    for (const auto& pair : j.at("carried"))
      v.carry.carried.emplace_back(pair.at(0).get<std::int64_t>(), pair.at(1).get<std::int64_t>());
    v.carry.unmatched = j.at("unmatched").get<std::vector<std::int64_t>>();
    return v;
  } catch (const nlohmann::json::exception& e) {
    throw StoreError(fmt::format("malformed engine-run value: {}", e.what()));
  }
}

std::string proposalsDigest(const std::vector<Event>& proposals,
                            const std::map<int, std::string>& names) {
  std::vector<std::string> lines;
  lines.reserve(proposals.size());
  for (const auto& p : proposals) {
    const auto it = names.find(p.position);
    lines.push_back(fmt::format("{}\t{}\t{}\t{}\t{}\n",
                                it != names.end() ? it->second : std::to_string(p.position), p.trap,
                                p.frame, toString(p.kind), p.confidence));
  }
  std::sort(lines.begin(), lines.end());
  Sha256 h;
  h.update("budledger-proposals/1\n");
  for (const auto& l : lines) h.update(l);
  return h.finishHex();
}

}  // namespace budledger::store
