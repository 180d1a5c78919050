#include "core/store/signoff.h"

#include <fmt/format.h>

#include <nlohmann/json.hpp>

#include "core/store/sqlite.h"

namespace budledger::store {

std::string_view toString(SignMeaning m) {
  return m == SignMeaning::Approved ? "approved" : "reviewed";
}

std::optional<SignMeaning> signMeaningFromString(std::string_view t) {
  if (t == "reviewed") return SignMeaning::Reviewed;
  if (t == "approved") return SignMeaning::Approved;
  return std::nullopt;
}

std::string signOffJson(const SignOffValue& v) {
  nlohmann::json j;
  j["scope"] = v.scopeName;
  j["meaning"] = std::string(toString(v.meaning));
  j["digest"] = v.digest;
  return j.dump();
}

SignOffValue parseSignOffJson(std::string_view json) {
  try {
    const auto j = nlohmann::json::parse(json);
    SignOffValue v;
    v.scopeName = j.at("scope").get<std::string>();
    v.digest = j.at("digest").get<std::string>();
    const auto m = signMeaningFromString(j.at("meaning").get<std::string>());
    if (!m) throw StoreError("unknown meaning");
    v.meaning = *m;
    return v;
  } catch (const nlohmann::json::exception& e) {
    throw StoreError(fmt::format("malformed sign-off value '{}': {}", json, e.what()));
  }
}

}  // namespace budledger::store
