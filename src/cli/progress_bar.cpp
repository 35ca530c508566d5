#include "progress_bar.h"

#include <unistd.h>

#include <cstdio>
#include <mutex>

namespace pkarta::cli {

struct ProgressBar::State {
  std::string label;
  bool terminal = false;
  int last_percent = -1;
  bool finished = false;
  std::mutex mutex;
};

ProgressBar::ProgressBar(std::string label) : state_(std::make_shared<State>()) {
  state_->label = std::move(label);
  state_->terminal = isatty(STDERR_FILENO) == 1;
}

bool ProgressBar::active() const { return state_->terminal; }

void ProgressBar::operator()(std::size_t done, std::size_t total) const {
  if (!state_->terminal || total == 0) return;
  std::lock_guard<std::mutex> lock(state_->mutex);
  if (state_->finished) return;
  const int percent = static_cast<int>(100 * (done < total ? done : total) / total);
  if (percent == state_->last_percent) return;
  state_->last_percent = percent;
  constexpr int kWidth = 30;
  const int filled = percent * kWidth / 100;
  std::string bar(static_cast<std::size_t>(filled), '#');
  bar.append(static_cast<std::size_t>(kWidth - filled), '.');
  std::fprintf(stderr, "\r%s [%s] %3d %%", state_->label.c_str(), bar.c_str(), percent);
  if (done >= total) {
    std::fputs("\n", stderr);
    state_->finished = true;
  }
  std::fflush(stderr);
}

}  // namespace pkarta::cli
