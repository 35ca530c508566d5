// The one progress bar of the command line, on stderr, for long work (Monte Carlo bands, a
// screen of many compounds, a report).
#ifndef PKARTA_CLI_PROGRESS_BAR_H_
#define PKARTA_CLI_PROGRESS_BAR_H_

#include <cstddef>
#include <functional>
#include <memory>
#include <string>

namespace pkarta::cli {

/// A callable (done, total) that draws "label [#####.....]  45 % (450/1000)" on stderr, only
/// when stderr is a terminal (pipes and log files stay clean), only once the work has run for
/// 0.2 s and looks like taking more than a second, at most ten times a second; the line is
/// cleared when done reaches total, at finish(), or when the last copy goes, so no trace is left
/// before the results. Standard output is never touched. Converts to
/// std::function<void(int, int)> (MonteCarloRun::progress) and
/// std::function<void(std::size_t, std::size_t)> (BatchOptions::progress, ReportRequest::progress).
/// Copies share state.
///
/// Example: run.progress = ProgressBar("uncertainty");
class ProgressBar {
 public:
  explicit ProgressBar(std::string label);
  void operator()(std::size_t done, std::size_t total) const;
  /// Clears the bar (if drawn) and draws no more.
  void finish() const;
  /// True when a bar may be drawn (stderr is a terminal).
  bool active() const;

 private:
  struct State;
  std::shared_ptr<State> state_;
};

}  // namespace pkarta::cli

#endif  // PKARTA_CLI_PROGRESS_BAR_H_
