#include "pkarta/base/suggest.h"

#include <algorithm>
#include <cctype>

namespace pkarta {

namespace {
char lower(char c) { return static_cast<char>(std::tolower(static_cast<unsigned char>(c))); }
}  // namespace

int edit_distance(std::string_view a, std::string_view b) {
  // Optimal string alignment distance (Damerau-Levenshtein restricted to adjacent swaps).
  const std::size_t n = a.size();
  const std::size_t m = b.size();
  std::vector<std::vector<int>> d(n + 1, std::vector<int>(m + 1, 0));
  for (std::size_t i = 0; i <= n; ++i) d[i][0] = static_cast<int>(i);
  for (std::size_t j = 0; j <= m; ++j) d[0][j] = static_cast<int>(j);
  for (std::size_t i = 1; i <= n; ++i) {
    for (std::size_t j = 1; j <= m; ++j) {
      const int cost = lower(a[i - 1]) == lower(b[j - 1]) ? 0 : 1;
      d[i][j] = std::min({d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost});
      if (i > 1 && j > 1 && lower(a[i - 1]) == lower(b[j - 2]) && lower(a[i - 2]) == lower(b[j - 1])) {
        d[i][j] = std::min(d[i][j], d[i - 2][j - 2] + 1);
      }
    }
  }
  return d[n][m];
}

std::string nearest_name(std::string_view name, const std::vector<std::string>& candidates) {
  if (name.empty()) return "";
  const int allowed = std::max(1, static_cast<int>(name.size()) / 3);
  std::string best;
  int best_distance = allowed + 1;
  for (const std::string& c : candidates) {
    int dist = edit_distance(name, c);
    // A clear prefix ("phosph" for "phosphate") counts as close.
    if (name.size() >= 3 && c.size() > name.size() && edit_distance(name, c.substr(0, name.size())) == 0) {
      dist = std::min(dist, 1);
    }
    if (dist < best_distance) {
      best_distance = dist;
      best = c;
    }
  }
  return best_distance <= allowed ? best : "";
}

std::string did_you_mean(std::string_view name, const std::vector<std::string>& candidates) {
  const std::string best = nearest_name(name, candidates);
  return best.empty() ? "" : "; did you mean '" + best + "'?";
}

}  // namespace pkarta
