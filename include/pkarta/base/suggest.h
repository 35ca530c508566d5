// "Did you mean" suggestions for mistyped names (options, reagents, buffers, media).
#ifndef PKARTA_BASE_SUGGEST_H_
#define PKARTA_BASE_SUGGEST_H_

#include <string>
#include <string_view>
#include <vector>

namespace pkarta {

/// Edit distance (insertions, deletions, substitutions, adjacent swaps), ignoring case.
int edit_distance(std::string_view a, std::string_view b);

/// The candidate closest to `name` when it is close enough to be a typing slip (at most a
/// third of the name's length, and at least 1, edits; or `name` as a prefix); else empty.
std::string nearest_name(std::string_view name, const std::vector<std::string>& candidates);

/// "; did you mean 'X'?" for the nearest candidate, or an empty string.
std::string did_you_mean(std::string_view name, const std::vector<std::string>& candidates);

}  // namespace pkarta

#endif  // PKARTA_BASE_SUGGEST_H_
