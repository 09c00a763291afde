#pragma once
// Work items and their results as bytes, for ranks that share no memory.
// Exact: a double travels as its 8 bytes (NaN payloads, -0 and subnormals
// included), so a result gathered from another rank is the one computed
// there, bit for bit. Ranks run the same build on one kind of machine (the
// bytes are in the machine's own order).
#include <string>

#include "study/work_items.hpp"

namespace tocsin {

std::string encode_work_item(const WorkItem& item);
WorkItem decode_work_item(const std::string& bytes);

std::string encode_work_result(const WorkResult& result);
// Throws std::runtime_error when the bytes end early or run on.
WorkResult decode_work_result(const std::string& bytes);

// A replayed log, read once and sent to the other ranks.
std::string encode_population(const Population& population);
Population decode_population(const std::string& bytes);

}  // namespace tocsin
