// A progress bar on stderr for long computations (Monte Carlo bands, batch screens).
#ifndef PKARTA_CLI_PROGRESS_BAR_H_
#define PKARTA_CLI_PROGRESS_BAR_H_

#include <cstddef>
#include <functional>
#include <memory>
#include <string>

namespace pkarta::cli {

/// A callable (done, total) that redraws "label [#####.....]  45 %" on stderr when stderr is a
/// terminal, and does nothing otherwise (so pipes and log files stay clean). Converts to
/// std::function<void(int, int)> (MonteCarloRun::progress) and
/// std::function<void(std::size_t, std::size_t)> (BatchOptions::progress). Copies share state.
///
/// Example: run.progress = ProgressBar("profile bands");
class ProgressBar {
 public:
  explicit ProgressBar(std::string label);
  void operator()(std::size_t done, std::size_t total) const;
  /// True when a bar is drawn (stderr is a terminal).
  bool active() const;

 private:
  struct State;
  std::shared_ptr<State> state_;
};

}  // namespace pkarta::cli

#endif  // PKARTA_CLI_PROGRESS_BAR_H_
