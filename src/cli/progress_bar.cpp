#include "progress_bar.h"

#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <mutex>

namespace pkarta::cli {

struct ProgressBar::State {
  using Clock = std::chrono::steady_clock;
  std::string label;
  bool terminal = false;
  bool drawn = false;
  bool finished = false;
  std::size_t drawn_width = 0;
  Clock::time_point start = Clock::now();
  Clock::time_point last;
  std::mutex mutex;

  void clear() {
    if (!drawn) return;
    std::fprintf(stderr, "\r%s\r", std::string(drawn_width, ' ').c_str());
    std::fflush(stderr);
    drawn = false;
  }
  ~State() { clear(); }
};

ProgressBar::ProgressBar(std::string label) : state_(std::make_shared<State>()) {
  state_->label = std::move(label);
  state_->terminal = isatty(STDERR_FILENO) == 1;
}

bool ProgressBar::active() const { return state_->terminal; }

void ProgressBar::finish() const {
  std::lock_guard<std::mutex> lock(state_->mutex);
  state_->clear();
  state_->finished = true;
}

void ProgressBar::operator()(std::size_t done, std::size_t total) const {
  if (!state_->terminal || total == 0) return;
  std::lock_guard<std::mutex> lock(state_->mutex);
  State& s = *state_;
  if (s.finished) return;
  if (done >= total) {
    s.clear();
    s.finished = true;
    return;
  }
  const auto now = State::Clock::now();
  const double elapsed = std::chrono::duration<double>(now - s.start).count();
  const double expected = done > 0 ? elapsed * static_cast<double>(total) / static_cast<double>(done) : 0.0;
  if (!s.drawn && (elapsed < 0.2 || expected < 1.0)) return;
  if (s.drawn && std::chrono::duration<double>(now - s.last).count() < 0.1) return;
  s.last = now;
  constexpr std::size_t kWidth = 30;
  const std::size_t filled = kWidth * done / total;
  const std::string line = s.label + " [" + std::string(filled, '#') + std::string(kWidth - filled, '.') + "] " +
                           std::to_string(100 * done / total) + " % (" + std::to_string(done) + "/" +
                           std::to_string(total) + ")";
  std::fprintf(stderr, "\r%s", line.c_str());
  std::fflush(stderr);
  s.drawn = true;
  if (line.size() > s.drawn_width) s.drawn_width = line.size();
}

}  // namespace pkarta::cli
