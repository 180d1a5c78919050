#pragma once
// SHA-256 of input files in blocks, checking a cancel flag between blocks,
// so that digesting a large stack on a helper thread never holds up a
// cancellation for long.
#include <atomic>
#include <filesystem>
#include <string>

namespace budledger::pipeline {

// Throws InputError naming the file if it cannot be read; returns "" if
// `cancelled` became true before the end.
std::string digestFile(const std::filesystem::path& file, const std::atomic<bool>& cancelled);

}  // namespace budledger::pipeline
