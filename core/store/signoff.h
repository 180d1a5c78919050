#pragma once
// Sign-offs: a named person, in a role, states a meaning (reviewed, approved)
// for a scope, binding the digest of the lifespans in that scope at that
// moment (lifespans.h). A sign-off is the journal entry that made it; it
// stays active until a revoke entry names it. While active, no edit may
// change anything inside its scope (the Editor refuses; replay and verify
// report an entry that did).
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>

#include "core/store/scope.h"

namespace budledger::store {

enum class SignMeaning : std::uint8_t { Reviewed, Approved };
std::string_view toString(SignMeaning meaning);  // "reviewed", "approved"
std::optional<SignMeaning> signMeaningFromString(std::string_view text);

struct SignOffRecord {
  std::int64_t id = 0;  // seq of the sign-off entry
  Scope scope;
  std::string scopeName;  // named scope text (scope.h) that the digest binds
  std::string person;
  std::string role;
  SignMeaning meaning = SignMeaning::Reviewed;
  std::string digest;
  std::string utc;
  std::optional<std::int64_t> revokedSeq;

  bool active() const { return !revokedSeq; }
  bool operator==(const SignOffRecord&) const = default;
};

// The sign-off entry's value after: {"digest":"…","meaning":"approved","scope":"trap:pos01/4"}.
struct SignOffValue {
  std::string scopeName;
  SignMeaning meaning = SignMeaning::Reviewed;
  std::string digest;
};
std::string signOffJson(const SignOffValue& v);
SignOffValue parseSignOffJson(std::string_view json);  // throws StoreError

inline constexpr std::string_view kActiveJson = R"({"active":true})";
inline constexpr std::string_view kRevokedJson = R"({"active":false})";

}  // namespace budledger::store
