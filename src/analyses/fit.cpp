#include "pkarta/analyses/fit.h"

#include <Eigen/Cholesky>
#include <Eigen/QR>
#include <Eigen/SVD>
#include <nlohmann/json.hpp>
#include <pugixml.hpp>

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdio>
#include <limits>
#include <cstring>
#include <map>
#include <sstream>

#include "pkarta/base/format.h"
#include "pkarta/chem/units.h"
#include "pkarta/io/xml_input.h"

namespace pkarta {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

std::string lower(std::string s) {
  for (char& c : s) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
  return s;
}

std::string trim(const std::string& s) {
  const auto b = s.find_first_not_of(" \t\r");
  if (b == std::string::npos) return "";
  const auto e = s.find_last_not_of(" \t\r");
  return s.substr(b, e - b + 1);
}

std::string format_g(double v, int digits) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

std::string format_f(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", decimals, v);
  return buf;
}

// ----- CSV ---------------------------------------------------------------------------------

struct CsvField {
  std::string text;
  int column = 1;  // 1-based character column where the field starts
};

// Splits one CSV record (RFC 4180 quoting, no embedded line breaks).
std::vector<CsvField> split_csv_line(const std::string& line, const std::string& name, int line_no) {
  std::vector<CsvField> out;
  std::size_t i = 0;
  while (true) {
    CsvField f;
    f.column = static_cast<int>(i) + 1;
    std::size_t j = i;
    while (j < line.size() && (line[j] == ' ' || line[j] == '\t')) ++j;
    if (j < line.size() && line[j] == '"') {
      ++j;
      bool closed = false;
      while (j < line.size()) {
        if (line[j] == '"') {
          if (j + 1 < line.size() && line[j + 1] == '"') {
            f.text += '"';
            j += 2;
            continue;
          }
          closed = true;
          ++j;
          break;
        }
        f.text += line[j++];
      }
      if (!closed) {
        throw InputError(SourceLocation{name, line_no, f.column}, "unterminated quoted field");
      }
      while (j < line.size() && (line[j] == ' ' || line[j] == '\t' || line[j] == '\r')) ++j;
      if (j < line.size() && line[j] != ',') {
        throw InputError(SourceLocation{name, line_no, static_cast<int>(j) + 1},
                         "unexpected text after a quoted field");
      }
    } else {
      while (j < line.size() && line[j] != ',') f.text += line[j++];
      f.text = trim(f.text);
    }
    out.push_back(f);
    if (j >= line.size()) break;
    i = j + 1;  // past the comma
  }
  return out;
}

double cell_number(const CsvField& f, const std::string& column, const std::string& name, int line) {
  try {
    if (f.text.empty()) throw InputError("empty cell");
    return parse_number(f.text, "cell");
  } catch (const InputError&) {
    throw InputError(SourceLocation{name, line, f.column},
                     "column '" + column + "' is not a number: \"" + f.text + "\"");
  }
}

// ----- parameters --------------------------------------------------------------------------

FitParameter make_s0(const Compound& c) {
  FitParameter p;
  p.kind = FitParameter::Kind::kLog10S0;
  p.name = "log10_S0_mol_per_L";
  p.start = std::log10(c.s0_mol_per_L);
  p.lower = -15.0;
  p.upper = 1.0;
  return p;
}

FitParameter make_pka(const Compound& c, int i) {
  FitParameter p;
  p.kind = FitParameter::Kind::kPka;
  p.index = i;
  p.name = "pKa" + std::to_string(i + 1);
  p.start = c.system.pkas[i].value;
  p.lower = -3.0;
  p.upper = 17.0;
  return p;
}

FitParameter make_ksp(const Compound& c, int k) {
  FitParameter p;
  p.kind = FitParameter::Kind::kLog10Ksp;
  p.index = k;
  p.name = "log10_Ksp:" + c.salts[k].id;
  p.start = std::log10(*c.salts[k].ksp);
  p.lower = -40.0;
  p.upper = 2.0;
  return p;
}

void apply(Compound& c, const std::vector<FitParameter>& params, const Eigen::VectorXd& x) {
  for (std::size_t k = 0; k < params.size(); ++k) {
    const FitParameter& p = params[k];
    switch (p.kind) {
      case FitParameter::Kind::kLog10S0: c.s0_mol_per_L = std::pow(10.0, x[k]); break;
      case FitParameter::Kind::kPka: c.system.pkas[p.index].value = x[k]; break;
      case FitParameter::Kind::kLog10Ksp: c.salts[p.index].ksp = std::pow(10.0, x[k]); break;
    }
  }
}

// The model: log10 solubility at every point, for parameter vector x.
class FitModel {
 public:
  FitModel(const Compound& compound, const Library& library, const std::vector<FitPoint>& points,
           const std::vector<FitParameter>& params, const ProfileConditions& conditions)
      : base_(compound), library_(library), points_(points), params_(params), conditions_(conditions) {
    base_.measured.clear();  // not needed by the model; keeps per-call copies small
    base_.description.clear();
  }

  // Returns false when a model value is not finite.
  bool evaluate(const Eigen::VectorXd& x, Eigen::VectorXd* f, std::vector<std::string>* solids = nullptr) {
    Compound c = base_;
    apply(c, params_, x);
    f->resize(static_cast<Eigen::Index>(points_.size()));
    if (solids) solids->assign(points_.size(), "");
    ProfileConditions cond = conditions_;
    for (std::size_t i = 0; i < points_.size(); ++i) {
      cond.temperature_C = points_[i].temperature_C;
      const SolubilityAtPh s = solubility_at_pH(c, library_, points_[i].pH, cond);
      ++evaluations_;
      const double v = std::log10(s.solubility_mol_per_L);
      if (!std::isfinite(v)) return false;
      (*f)[static_cast<Eigen::Index>(i)] = v;
      if (solids) (*solids)[i] = s.limiting_solid;
    }
    return true;
  }

  // Forward-difference Jacobian of f at x (f0 = f(x)); steps stay inside the bounds.
  bool jacobian(const Eigen::VectorXd& x, const Eigen::VectorXd& f0, double step, Eigen::MatrixXd* jac) {
    const Eigen::Index n = x.size();
    jac->resize(f0.size(), n);
    Eigen::VectorXd f1;
    for (Eigen::Index k = 0; k < n; ++k) {
      Eigen::VectorXd xs = x;
      double h = step;
      if (xs[k] + h > params_[k].upper) h = -h;
      xs[k] += h;
      if (!evaluate(xs, &f1)) return false;
      jac->col(k) = (f1 - f0) / h;
    }
    return true;
  }

  long evaluations() const { return evaluations_; }

 private:
  Compound base_;
  const Library& library_;
  const std::vector<FitPoint>& points_;
  const std::vector<FitParameter>& params_;
  ProfileConditions conditions_;
  long evaluations_ = 0;
};

Eigen::VectorXd clamp_to_bounds(Eigen::VectorXd x, const std::vector<FitParameter>& params) {
  for (Eigen::Index k = 0; k < x.size(); ++k) {
    x[k] = std::clamp(x[k], params[k].lower, params[k].upper);
  }
  return x;
}

std::string join(const std::vector<std::string>& v, const std::string& sep) {
  std::string s;
  for (std::size_t i = 0; i < v.size(); ++i) s += (i ? sep : "") + v[i];
  return s;
}

}  // namespace

bool FitOptions::is_valid(std::string* error) const {
  auto fail = [&](const std::string& what) {
    if (error) *error = "FitOptions::" + what;
    return false;
  };
  if (!(max_iterations >= 1)) return fail("max_iterations = " + std::to_string(max_iterations) + ", must be >= 1");
  if (!(relative_step_tolerance > 0)) return fail("relative_step_tolerance must be > 0");
  if (!(derivative_step > 0 && derivative_step < 0.1)) return fail("derivative_step must be in (0, 0.1)");
  if (!(pka_window_pH > 0)) return fail("pka_window_pH must be > 0");
  return true;
}

std::vector<FitPoint> fit_points_from_compound(const Compound& compound) {
  std::vector<FitPoint> out;
  for (const MeasuredPoint& m : compound.measured) {
    FitPoint p;
    p.pH = m.pH;
    p.solubility_mol_per_L = m.solubility_mol_per_L;
    p.temperature_C = m.temperature_C;
    p.where = m.where;
    out.push_back(p);
  }
  return out;
}

std::vector<FitPoint> parse_solubility_csv(const std::string& text_in, const std::string& name,
                                           double molar_mass_g_per_mol,
                                           std::vector<std::string>* warnings) {
  std::string text = text_in;
  if (text.size() >= 3 && static_cast<unsigned char>(text[0]) == 0xEF &&
      static_cast<unsigned char>(text[1]) == 0xBB && static_cast<unsigned char>(text[2]) == 0xBF) {
    text.erase(0, 3);  // UTF-8 byte order mark
  }
  std::vector<FitPoint> out;
  std::istringstream in(text);
  std::string line;
  int line_no = 0;
  int col_ph = -1, col_value = -1, col_unit = -1, col_temp = -1, col_sd = -1;
  std::size_t ncols = 0;
  bool have_header = false;
  int header_line = 0;
  while (std::getline(in, line)) {
    ++line_no;
    if (!line.empty() && line.back() == '\r') line.pop_back();
    const std::string t = trim(line);
    if (t.empty() || t[0] == '#') continue;
    const std::vector<CsvField> fields = split_csv_line(line, name, line_no);
    if (!have_header) {
      have_header = true;
      header_line = line_no;
      ncols = fields.size();
      for (std::size_t k = 0; k < fields.size(); ++k) {
        const std::string h = lower(fields[k].text);
        int* slot = nullptr;
        if (h == "ph") slot = &col_ph;
        else if (h == "value" || h == "solubility") slot = &col_value;
        else if (h == "unit") slot = &col_unit;
        else if (h == "temperature" || h == "temperature_c") slot = &col_temp;
        else if (h == "log_sd" || h == "sd_log10") slot = &col_sd;
        if (!slot) {
          if (h.find_first_not_of("0123456789.-+eE ") == std::string::npos) {
            throw InputError(SourceLocation{name, line_no, fields[k].column},
                             "the first row must be a header naming the columns pH, value, unit "
                             "(optional: temperature, log_sd), got \"" + fields[k].text + "\"");
          }
          if (warnings) {
            warnings->push_back(SourceLocation{name, line_no, fields[k].column}.str() +
                                ": warning: unknown column '" + fields[k].text + "' ignored");
          }
          continue;
        }
        if (*slot >= 0) {
          throw InputError(SourceLocation{name, line_no, fields[k].column},
                           "column '" + fields[k].text + "' appears twice");
        }
        *slot = static_cast<int>(k);
      }
      std::vector<std::string> missing;
      if (col_ph < 0) missing.push_back("pH");
      if (col_value < 0) missing.push_back("value");
      if (col_unit < 0) missing.push_back("unit");
      if (!missing.empty()) {
        throw InputError(SourceLocation{name, line_no, 1},
                         "header lacks the column" + std::string(missing.size() > 1 ? "s " : " ") +
                             join(missing, ", ") + " (required: pH, value, unit; optional: "
                             "temperature, log_sd)");
      }
      continue;
    }
    if (fields.size() != ncols) {
      throw InputError(SourceLocation{name, line_no, 1},
                       "row has " + std::to_string(fields.size()) + " fields, the header (line " +
                           std::to_string(header_line) + ") has " + std::to_string(ncols));
    }
    FitPoint p;
    p.where = SourceLocation{name, line_no, 1};
    const CsvField& fph = fields[col_ph];
    p.pH = cell_number(fph, "pH", name, line_no);
    if (!(p.pH >= -1.0 && p.pH <= 15.0)) {
      throw InputError(SourceLocation{name, line_no, fph.column},
                       "column 'pH' is " + fph.text + ", expected -1 to 15");
    }
    const CsvField& fv = fields[col_value];
    const double v = cell_number(fv, "value", name, line_no);
    if (!(v > 0)) {
      throw InputError(SourceLocation{name, line_no, fv.column},
                       "solubility must be > 0, got " + fv.text);
    }
    if (col_temp >= 0 && !fields[col_temp].text.empty()) {
      p.temperature_C = cell_number(fields[col_temp], "temperature", name, line_no);
      if (!(p.temperature_C >= -10.0 && p.temperature_C <= 100.0)) {
        throw InputError(SourceLocation{name, line_no, fields[col_temp].column},
                         "column 'temperature' is " + fields[col_temp].text + " °C, expected -10 to 100");
      }
    }
    if (col_sd >= 0 && !fields[col_sd].text.empty()) {
      p.log10_sd = cell_number(fields[col_sd], "log_sd", name, line_no);
      if (!(p.log10_sd > 0 && p.log10_sd <= 5.0)) {
        throw InputError(SourceLocation{name, line_no, fields[col_sd].column},
                         "column 'log_sd' is " + fields[col_sd].text + ", expected > 0 and <= 5");
      }
    }
    const CsvField& fu = fields[col_unit];
    Amount a;
    try {
      if (fu.text.empty()) throw InputError("empty unit");
      a = parse_amount("1" + fu.text);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{name, line_no, fu.column},
                       "column 'unit': unknown unit \"" + fu.text +
                           "\" (expected e.g. M, mM, mg/mL, ug/mL, g/L)");
    }
    a.value = v;
    try {
      p.solubility_mol_per_L = a.to_mol_per_L(molar_mass_g_per_mol, p.temperature_C);
    } catch (const InputError& e) {
      throw InputError(SourceLocation{name, line_no, fu.column}, e.message());
    }
    out.push_back(p);
  }
  if (!have_header) {
    throw InputError(SourceLocation{name, line_no > 0 ? line_no : 1, 0},
                     "no header row: the file must start with a header naming pH, value, unit");
  }
  if (out.empty()) throw InputError(SourceLocation{name, line_no, 0}, "no data rows after the header");
  return out;
}

std::vector<FitPoint> read_solubility_csv(const std::string& path, double molar_mass_g_per_mol,
                                          std::vector<std::string>* warnings) {
  return parse_solubility_csv(read_text_file(path), path, molar_mass_g_per_mol, warnings);
}

std::vector<FitParameter> parse_fit_parameters(const std::string& list, const Compound& compound,
                                               const std::string& option) {
  std::vector<FitParameter> out;
  const SourceLocation at{option, 0, 0};
  std::string item;
  std::istringstream in(list);
  std::vector<std::string> items;
  while (std::getline(in, item, ',')) items.push_back(trim(item));
  if (items.empty()) throw InputError(at, "no parameters given (e.g. s0,pka1,ksp:hydrochloride)");
  for (const std::string& raw : items) {
    const std::string it = lower(raw);
    FitParameter p;
    if (it == "s0") {
      if (!compound.has_intrinsic_solubility) {
        throw InputError(at, "'s0': compound '" + compound.id + "' has no intrinsic solubility "
                             "(no net-neutral form)");
      }
      p = make_s0(compound);
    } else if (it.rfind("pka", 0) == 0 && it.size() > 3 &&
               it.find_first_not_of("0123456789", 3) == std::string::npos) {
      const int n = static_cast<int>(compound.system.pkas.size());
      const int k = std::atoi(it.c_str() + 3);
      if (k < 1 || k > n) {
        throw InputError(at, "'" + raw + "': compound '" + compound.id + "' has " + std::to_string(n) +
                                 " pKa value" + (n == 1 ? "" : "s") + " (pka1" +
                                 (n > 1 ? "..pka" + std::to_string(n) : "") + ")");
      }
      p = make_pka(compound, k - 1);
    } else if (it.rfind("ksp:", 0) == 0) {
      const std::string id = trim(raw.substr(4));
      int found = -1;
      for (std::size_t k = 0; k < compound.salts.size(); ++k) {
        if (compound.salts[k].id == id) found = static_cast<int>(k);
      }
      if (found < 0) {
        std::vector<std::string> ids;
        for (const Salt& s : compound.salts) ids.push_back(s.id);
        throw InputError(at, "'" + raw + "': compound '" + compound.id + "' has no salt '" + id + "'" +
                                 (ids.empty() ? " (it has no salts)" : " (salts: " + join(ids, ", ") + ")"));
      }
      if (!compound.salts[found].ksp) throw InputError(at, "'" + raw + "': the salt has no Ksp to start from");
      p = make_ksp(compound, found);
    } else {
      throw InputError(at, "unknown parameter '" + raw + "', expected s0, pka1..pkaN or ksp:SALT");
    }
    for (const FitParameter& q : out) {
      if (q.name == p.name) throw InputError(at, "parameter '" + raw + "' is given twice");
    }
    out.push_back(p);
  }
  return out;
}

std::vector<FitParameter> default_fit_parameters(const Compound& compound, const Library& library,
                                                 const std::vector<FitPoint>& points,
                                                 const FitOptions& options) {
  std::vector<FitParameter> out;
  if (compound.has_intrinsic_solubility) out.push_back(make_s0(compound));
  for (int i = 0; i < static_cast<int>(compound.system.pkas.size()); ++i) out.push_back(make_pka(compound, i));
  std::vector<bool> limits(compound.salts.size(), false);
  ProfileConditions cond = options.conditions;
  for (const FitPoint& p : points) {
    cond.temperature_C = p.temperature_C;
    const SolubilityAtPh s = solubility_at_pH(compound, library, p.pH, cond);
    for (std::size_t k = 0; k < compound.salts.size(); ++k) {
      if (s.limiting_solid == compound.salts[k].id) limits[k] = true;
    }
  }
  for (std::size_t k = 0; k < compound.salts.size(); ++k) {
    if (limits[k] && compound.salts[k].ksp) out.push_back(make_ksp(compound, static_cast<int>(k)));
  }
  return out;
}

FitResult fit_solubility(const Compound& compound, const Library& library,
                         const std::vector<FitPoint>& points, std::vector<FitParameter> parameters,
                         const FitOptions& options) {
  FitResult r;
  r.fitted = compound;
  std::string err;
  if (!options.is_valid(&err)) {
    r.message = err;
    return r;
  }
  const int m = static_cast<int>(points.size());
  const int n = static_cast<int>(parameters.size());
  if (n == 0) {
    r.message = "no parameters to fit";
    return r;
  }
  if (m < n) {
    std::vector<std::string> names;
    names.reserve(parameters.size());
    for (const FitParameter& p : parameters) names.push_back(p.name);
    const SourceLocation at = m > 0 ? points.back().where : SourceLocation{};
    throw InputError(SourceLocation{at.file, at.line, 0},
                     std::to_string(m) + " measured point" + (m == 1 ? "" : "s") + " for " +
                         std::to_string(n) + " parameters (" + join(names, ", ") +
                         "): give at least as many points as parameters, or fit fewer (--params)");
  }
  r.degrees_of_freedom = m - n;
  r.data_source = !points.front().where.file.empty() ? points.front().where.file : "given points";

  Eigen::VectorXd y(m), w(m);
  for (int i = 0; i < m; ++i) {
    y[i] = std::log10(points[i].solubility_mol_per_L);
    w[i] = points[i].log10_sd > 0 ? 1.0 / points[i].log10_sd : 1.0;  // sqrt of the weight
  }
  FitModel model(compound, library, points, parameters, options.conditions);
  Eigen::VectorXd x(n);
  for (int k = 0; k < n; ++k) x[k] = parameters[k].start;
  x = clamp_to_bounds(x, parameters);

  auto fail = [&](const std::string& msg) {
    r.status = FitStatus::kFailure;
    r.message = msg;
    r.evaluations = static_cast<int>(model.evaluations());
    return r;
  };

  Eigen::VectorXd f;
  if (!model.evaluate(x, &f)) return fail("the model gives no finite solubility at the starting values");
  Eigen::VectorXd res = (y - f).cwiseProduct(w);
  double cost = 0.5 * res.squaredNorm();
  double lambda = 1e-3;
  Eigen::MatrixXd jac;
  FitStatus status = FitStatus::kMaxIterations;
  int it = 0;
  while (status == FitStatus::kMaxIterations && it < options.max_iterations) {
    ++it;
    if (!model.jacobian(x, f, options.derivative_step, &jac)) {
      return fail("the model gives no finite solubility near the current estimates");
    }
    const Eigen::MatrixXd jw = w.asDiagonal() * jac;
    const Eigen::MatrixXd a = jw.transpose() * jw;
    const Eigen::VectorXd g = jw.transpose() * res;
    if (cost == 0.0 || g.cwiseAbs().maxCoeff() <= 1e-14 * std::max(1.0, cost)) {
      status = FitStatus::kConverged;
      break;
    }
    const double dmax = std::max(a.diagonal().maxCoeff(), 1e-300);
    bool accepted = false;
    while (!accepted) {
      Eigen::MatrixXd damped = a;
      for (int k = 0; k < n; ++k) damped(k, k) += lambda * std::max(a(k, k), 1e-9 * dmax);
      const Eigen::LDLT<Eigen::MatrixXd> ldlt(damped);
      Eigen::VectorXd step;
      if (ldlt.info() == Eigen::Success) step = ldlt.solve(g);
      if (ldlt.info() != Eigen::Success || !step.allFinite()) {
        lambda *= 10.0;
        if (lambda > 1e12) break;
        continue;
      }
      const Eigen::VectorXd xn = clamp_to_bounds(x + step, parameters);
      Eigen::VectorXd fn;
      if (!model.evaluate(xn, &fn)) {
        lambda *= 4.0;
        if (lambda > 1e12) break;
        continue;
      }
      const Eigen::VectorXd rn = (y - fn).cwiseProduct(w);
      const double cn = 0.5 * rn.squaredNorm();
      if (cn < cost) {
        const Eigen::VectorXd dx = xn - x;
        const double decrease = cost - cn;
        x = xn;
        f = fn;
        res = rn;
        accepted = true;
        lambda = std::max(lambda * 0.3, 1e-12);
        bool small = true;
        for (int k = 0; k < n; ++k) {
          small = small && std::fabs(dx[k]) <= options.relative_step_tolerance * (1.0 + std::fabs(x[k]));
        }
        if (small || decrease <= 1e-15 * cost) status = FitStatus::kConverged;
        cost = cn;
      } else {
        lambda *= 4.0;
        if (lambda > 1e12) break;
      }
    }
    // No step lowers the cost any more: a minimum to working precision.
    if (!accepted) status = FitStatus::kConverged;
  }
  r.iterations = it;
  r.status = status;
  r.message = status == FitStatus::kConverged ? "converged" : "no convergence within " +
                                                                   std::to_string(options.max_iterations) +
                                                                   " iterations";

  // Final state: residuals, Jacobian, covariance.
  std::vector<std::string> solids;
  model.evaluate(x, &f, &solids);
  if (!model.jacobian(x, f, options.derivative_step, &jac)) return fail("the model failed at the estimates");
  r.evaluations = static_cast<int>(model.evaluations());
  res = (y - f).cwiseProduct(w);
  const double chi2 = res.squaredNorm();
  r.rms_log10 = std::sqrt((y - f).squaredNorm() / m);
  r.residual_sd = r.degrees_of_freedom > 0 ? std::sqrt(chi2 / r.degrees_of_freedom) : kNaN;
  for (int i = 0; i < m; ++i) {
    FitResidual fr;
    fr.pH = points[i].pH;
    fr.temperature_C = points[i].temperature_C;
    fr.observed_log10 = y[i];
    fr.fitted_log10 = f[i];
    fr.weight = w[i] * w[i];
    fr.limiting_solid = solids[i];
    r.residuals.push_back(fr);
  }

  const Eigen::MatrixXd jw = w.asDiagonal() * jac;
  Eigen::VectorXd norms(n);
  for (int k = 0; k < n; ++k) norms[k] = jw.col(k).norm();
  const double norm_max = norms.maxCoeff();
  std::vector<bool> undetermined(n, false);
  std::vector<std::string> no_effect;
  for (int k = 0; k < n; ++k) {
    if (!(norms[k] > 1e-10 * std::max(norm_max, 1e-300)) || !(norms[k] > 1e-12)) {
      undetermined[k] = true;
      no_effect.push_back(parameters[k].name);
    }
  }
  if (!no_effect.empty()) {
    r.warnings.push_back(join(no_effect, ", ") + (no_effect.size() > 1 ? " have" : " has") +
                         " no effect on the model at the measured points, so the data do not "
                         "determine " + (no_effect.size() > 1 ? "them" : "it"));
  }
  // Column-scaled Jacobian of the parameters that act; rank from a rank-revealing QR.
  std::vector<int> act;
  for (int k = 0; k < n; ++k) {
    if (!undetermined[k]) act.push_back(k);
  }
  r.covariance = Eigen::MatrixXd::Constant(n, n, kNaN);
  if (!act.empty()) {
    const int na = static_cast<int>(act.size());
    Eigen::MatrixXd js(m, na);
    for (int a = 0; a < na; ++a) js.col(a) = jw.col(act[a]) / norms[act[a]];
    Eigen::ColPivHouseholderQR<Eigen::MatrixXd> qr(js);
    qr.setThreshold(1e-6);  // well above the noise of the forward differences
    const int rank = static_cast<int>(qr.rank());
    r.rank = rank;
    Eigen::MatrixXd inv_scaled;  // (Js'Js)^-1 or its pseudo-inverse
    std::vector<bool> in_null(na, false);
    if (rank < na) {
      const Eigen::JacobiSVD<Eigen::MatrixXd> svd(js, Eigen::ComputeThinV);
      const Eigen::VectorXd& sv = svd.singularValues();
      const Eigen::MatrixXd& v = svd.matrixV();
      std::vector<std::string> names;
      for (int c = rank; c < na; ++c) {
        for (int a = 0; a < na; ++a) {
          if (std::fabs(v(a, c)) > 0.2 && !in_null[a]) {
            in_null[a] = true;
            names.push_back(parameters[act[a]].name);
          }
        }
      }
      r.warnings.push_back("the Jacobian is rank-deficient (rank " + std::to_string(rank) + " of " +
                           std::to_string(na) + "): " + join(names, ", ") +
                           " are not separately determined by the data; fix some of them "
                           "(--params) or add points where they act");
      Eigen::VectorXd sinv2 = Eigen::VectorXd::Zero(na);
      for (int c = 0; c < rank; ++c) sinv2[c] = 1.0 / (sv[c] * sv[c]);
      inv_scaled = v * sinv2.asDiagonal() * v.transpose();
    } else {
      const Eigen::MatrixXd rr = qr.matrixR().topLeftCorner(na, na).triangularView<Eigen::Upper>();
      const Eigen::MatrixXd rinv =
          rr.triangularView<Eigen::Upper>().solve(Eigen::MatrixXd::Identity(na, na));
      inv_scaled = qr.colsPermutation() * (rinv * rinv.transpose()) * qr.colsPermutation().transpose();
    }
    const double s2 = r.degrees_of_freedom > 0 ? chi2 / r.degrees_of_freedom : kNaN;
    for (int a = 0; a < na; ++a) {
      for (int b = 0; b < na; ++b) {
        double c = s2 * inv_scaled(a, b) / (norms[act[a]] * norms[act[b]]);
        if (in_null[a] || in_null[b]) c = kNaN;
        r.covariance(act[a], act[b]) = c;
      }
    }
    for (int a = 0; a < na; ++a) {
      if (in_null[a]) undetermined[act[a]] = true;
    }
  } else {
    r.rank = 0;
  }
  r.correlation = Eigen::MatrixXd::Constant(n, n, kNaN);
  for (int a = 0; a < n; ++a) {
    for (int b = 0; b < n; ++b) {
      const double d = std::sqrt(r.covariance(a, a) * r.covariance(b, b));
      r.correlation(a, b) = a == b && std::isfinite(d) ? 1.0 : r.covariance(a, b) / d;
    }
  }
  for (int k = 0; k < n; ++k) {
    parameters[k].estimate = x[k];
    const double v = r.covariance(k, k);
    parameters[k].std_error = std::isfinite(v) && v >= 0 ? std::sqrt(v) : kNaN;
  }
  r.parameters = parameters;
  apply(r.fitted, parameters, x);
  for (const FitParameter& p : parameters) {
    if (p.kind != FitParameter::Kind::kLog10Ksp) continue;
    r.fitted.salts[p.index].solubility_in_water_mol_per_L.reset();  // now given by its Ksp
    r.fitted.salts[p.index].solubility_in_water_text.clear();
  }

  // What the data do not determine.
  if (r.degrees_of_freedom == 0) {
    r.warnings.push_back("as many points as parameters: the fit is exact, so no residual variance "
                         "and no standard errors can be estimated");
  }
  if (status == FitStatus::kMaxIterations) r.warnings.push_back(r.message);
  for (int k = 0; k < n; ++k) {
    const FitParameter& p = parameters[k];
    if (p.kind == FitParameter::Kind::kPka) {
      double nearest = std::numeric_limits<double>::infinity();
      for (const FitPoint& pt : points) {
        const double pk = r.fitted.system.pkas[p.index].at(pt.temperature_C);
        nearest = std::min(nearest, std::fabs(pt.pH - pk));
      }
      if (nearest > options.pka_window_pH) {
        r.warnings.push_back(p.name + " = " + format_f(p.estimate, 2) + ": no measured point within ±" +
                             format_f(options.pka_window_pH, 1) +
                             " pH units of it, so the data hardly determine it");
      }
    } else if (p.kind == FitParameter::Kind::kLog10S0) {
      bool any = false;
      for (const std::string& s : solids) any = any || s == "free";
      if (!any) {
        r.warnings.push_back(p.name + ": no point is limited by the free form at the estimates, so "
                                      "the data hardly determine the intrinsic solubility");
      }
    } else {
      const std::string& id = compound.salts[p.index].id;
      bool any = false;
      for (const std::string& s : solids) any = any || s == id;
      if (!any) {
        r.warnings.push_back(p.name + ": no point is limited by the salt '" + id +
                             "' at the estimates, so the data hardly determine its Ksp");
      }
    }
    if (std::isfinite(p.std_error) && p.std_error > options.poor_std_error) {
      r.warnings.push_back(p.name + " is poorly determined: standard error " + format_g(p.std_error, 2));
    }
    if (p.estimate <= p.lower + 1e-9 || p.estimate >= p.upper - 1e-9) {
      r.warnings.push_back(p.name + " reached the end of its search range (" + format_g(p.lower, 3) +
                           " to " + format_g(p.upper, 3) + "): not determined by the data");
    }
  }
  for (int a = 0; a < n; ++a) {
    for (int b = a + 1; b < n; ++b) {
      const double c = r.correlation(a, b);
      if (std::isfinite(c) && std::fabs(c) > options.strong_correlation) {
        r.warnings.push_back(parameters[a].name + " and " + parameters[b].name +
                             " are strongly correlated (" + format_f(c, 3) +
                             "): the data determine a combination of them better than either");
      }
    }
  }
  const auto& pk = r.fitted.system.pkas;
  for (std::size_t i = 1; i < pk.size(); ++i) {
    if (!(pk[i].value > pk[i - 1].value)) {
      r.warnings.push_back("the fitted pKa values are not in ascending order (pKa" + std::to_string(i) +
                           " = " + format_f(pk[i - 1].value, 2) + ", pKa" + std::to_string(i + 1) + " = " +
                           format_f(pk[i].value, 2) + "): the model's macroscopic constants lose "
                           "their meaning; fix one of them");
      break;
    }
  }
  return r;
}

std::vector<double> fitted_curve_log10(const FitResult& result, const Library& library,
                                       const std::vector<double>& pH_grid, const FitOptions& options,
                                       double temperature_C) {
  ProfileConditions cond = options.conditions;
  cond.temperature_C = temperature_C;
  Compound c = result.fitted;
  c.measured.clear();
  std::vector<double> out;
  out.reserve(pH_grid.size());
  for (double pH : pH_grid) out.push_back(std::log10(solubility_at_pH(c, library, pH, cond).solubility_mol_per_L));
  return out;
}

// ----- fitted compound file ----------------------------------------------------------------

namespace {

// The start tag of an element in the original text: [begin, end) from '<' to just past '>'.
struct TagSpan {
  std::size_t begin = 0;
  std::size_t end = 0;
};

TagSpan tag_span(const std::string& text, const pugi::xml_node& n, const std::string& file) {
  const std::ptrdiff_t o = n.offset_debug();
  if (o <= 0 || static_cast<std::size_t>(o) > text.size() || text[o - 1] != '<' ||
      text.compare(static_cast<std::size_t>(o), std::strlen(n.name()), n.name()) != 0) {
    throw InputError(SourceLocation{file, 0, 0}, std::string("cannot locate <") + n.name() + "> in the file text");
  }
  TagSpan t;
  t.begin = static_cast<std::size_t>(o - 1);
  char quote = 0;
  for (std::size_t i = static_cast<std::size_t>(o); i < text.size(); ++i) {
    const char c = text[i];
    if (quote) {
      if (c == quote) quote = 0;
    } else if (c == '"' || c == '\'') {
      quote = c;
    } else if (c == '>') {
      t.end = i + 1;
      return t;
    }
  }
  throw InputError(SourceLocation{file, 0, 0}, std::string("unterminated <") + n.name() + "> tag");
}

// One attribute of a start tag's text: [space, value_end + 1) covers it with its leading
// whitespace; the value lies in [value_begin, value_end).
struct TagAttribute {
  std::string name;
  std::size_t space = 0;
  std::size_t value_begin = 0;
  std::size_t value_end = 0;
};

std::vector<TagAttribute> tag_attributes(const std::string& tag) {
  std::vector<TagAttribute> out;
  std::size_t i = 1;  // past '<'
  while (i < tag.size() && !std::isspace(static_cast<unsigned char>(tag[i])) && tag[i] != '/' && tag[i] != '>') ++i;
  while (i < tag.size()) {
    const std::size_t space = i;
    while (i < tag.size() && std::isspace(static_cast<unsigned char>(tag[i]))) ++i;
    if (i >= tag.size() || tag[i] == '/' || tag[i] == '>') break;
    TagAttribute a;
    a.space = space;
    while (i < tag.size() && tag[i] != '=' && !std::isspace(static_cast<unsigned char>(tag[i]))) a.name += tag[i++];
    while (i < tag.size() && (tag[i] == '=' || std::isspace(static_cast<unsigned char>(tag[i])))) ++i;
    if (i >= tag.size() || (tag[i] != '"' && tag[i] != '\'')) break;  // not well-formed: pugixml would have refused
    const char quote = tag[i++];
    a.value_begin = i;
    while (i < tag.size() && tag[i] != quote) ++i;
    a.value_end = i;
    ++i;
    out.push_back(a);
  }
  return out;
}

// Sets (or adds) attribute `name` in a start tag's text, keeping its quotes and the layout.
void set_tag_attribute(std::string& tag, const std::string& name, const std::string& value) {
  for (const TagAttribute& a : tag_attributes(tag)) {
    if (a.name == name) {
      tag.replace(a.value_begin, a.value_end - a.value_begin, value);
      return;
    }
  }
  std::size_t at = tag.size() - 1;  // before '>'
  if (at > 0 && tag[at - 1] == '/') --at;
  while (at > 0 && std::isspace(static_cast<unsigned char>(tag[at - 1]))) --at;
  tag.insert(at, " " + name + "=\"" + value + "\"");
}

void remove_tag_attribute(std::string& tag, const std::string& name) {
  for (const TagAttribute& a : tag_attributes(tag)) {
    if (a.name == name) {
      tag.erase(a.space, a.value_end + 1 - a.space);
      return;
    }
  }
}

}  // namespace

std::string fitted_compound_xml(const std::string& compound_path, const FitResult& result,
                                const Library& library) {
  std::string text = read_text_file(compound_path);
  pugi::xml_document doc;
  // No end-of-line or escape rewriting: node offsets must match the text edited below.
  const pugi::xml_parse_result pr = doc.load_buffer(text.data(), text.size(),
                                                    pugi::parse_minimal | pugi::parse_comments,
                                                    pugi::encoding_utf8);
  if (!pr) throw InputError(SourceLocation{compound_path, 0, 0}, std::string("malformed XML: ") + pr.description());
  const pugi::xml_node root = doc.child("compound");
  if (!root) throw InputError(SourceLocation{compound_path, 0, 0}, "no <compound> element");
  std::vector<pugi::xml_node> pkas;
  for (pugi::xml_node n : root.children("pka")) pkas.push_back(n);
  const Compound& c = result.fitted;

  // New start tags, keyed by their position in the text.
  std::map<std::size_t, std::pair<TagSpan, std::string>> edits;
  auto tag_of = [&](const pugi::xml_node& n) -> std::string& {
    const TagSpan span = tag_span(text, n, compound_path);
    auto it = edits.find(span.begin);
    if (it == edits.end()) {
      it = edits.emplace(span.begin, std::make_pair(span, text.substr(span.begin, span.end - span.begin))).first;
    }
    return it->second.second;
  };
  std::vector<std::string> names;
  for (const FitParameter& p : result.parameters) {
    names.push_back(p.name);
    const bool se = std::isfinite(p.std_error) && p.std_error > 0;
    switch (p.kind) {
      case FitParameter::Kind::kPka: {
        if (p.index >= static_cast<int>(pkas.size())) break;
        std::string& tag = tag_of(pkas[p.index]);
        set_tag_attribute(tag, "value", format_f(p.estimate, 3));
        if (se) set_tag_attribute(tag, "sd", format_g(p.std_error, 2));
        break;
      }
      case FitParameter::Kind::kLog10S0: {
        const pugi::xml_node s = root.child("intrinsic-solubility");
        if (!s) break;
        const Amount unit = parse_amount(std::string("1") + s.attribute("unit").value());
        const double per_unit = unit.to_mol_per_L(c.molar_mass_g_per_mol, c.s0_ref_temperature_C);
        std::string& tag = tag_of(s);
        set_tag_attribute(tag, "value", format_g(std::pow(10.0, p.estimate) / per_unit, 4));
        if (se) set_tag_attribute(tag, "log-sd", format_g(p.std_error, 2));
        break;
      }
      case FitParameter::Kind::kLog10Ksp: {
        const std::string& id = c.salts[p.index].id;
        for (const pugi::xml_node s : root.children("salt")) {
          if (id != s.attribute("id").value()) continue;
          std::string& tag = tag_of(s);
          remove_tag_attribute(tag, "solubility-in-water");
          set_tag_attribute(tag, "ksp", format_g(std::pow(10.0, p.estimate), 4));
        }
        break;
      }
    }
  }
  // Apply from the end so that earlier positions stay valid.
  for (auto it = edits.rbegin(); it != edits.rend(); ++it) {
    const TagSpan& span = it->second.first;
    text.replace(span.begin, span.end - span.begin, it->second.second);
  }
  // A comment naming the fit, on its own line above the <compound> element.
  std::string note = "<!-- Fitted by pkarta fit " + std::string(PKARTA_VERSION) + ": " + join(names, ", ") +
                     " to " + std::to_string(result.residuals.size()) + " measured points (" +
                     result.data_source + "); rms " + format_f(result.rms_log10, 3) +
                     " log10. Standard errors are written as sd and log-sd. -->";
  for (std::size_t i = 4; (i = note.find("--", i)) != std::string::npos && i + 3 < note.size();) {
    note.replace(i, 2, "- -");
  }
  const std::size_t root_at = tag_span(text, root, compound_path).begin;
  text.insert(root_at, note + "\n");
  try {
    parse_compound(text, compound_path, library, nullptr);
  } catch (const InputError& e) {
    throw InputError(SourceLocation{compound_path, 0, 0},
                     "the fitted values do not make a valid compound file: " + e.message());
  }
  return text;
}

// ----- writers -----------------------------------------------------------------------------

namespace {

std::string se_text(double se) { return std::isfinite(se) ? sig(se, 2) : "n/a"; }

}  // namespace

void write_fit_text(const FitResult& r, std::ostream& out) {
  out << "Fit of " << r.parameters.size() << " parameter" << (r.parameters.size() == 1 ? "" : "s")
      << " to " << r.residuals.size() << " measured solubilities (" << r.data_source << ")\n";
  out << "  model: solubility with excess solid, pH held by a titrant (as in profile); weighted least\n"
         "  squares in log10 S; constants at the reference temperatures of the compound file\n";
  out << "  status: " << r.message;
  if (r.iterations >= 0) out << " after " << r.iterations << " iterations (" << r.evaluations << " model evaluations)";
  out << "\n\n";
  TextTable t({"parameter", "start", "estimate", "std error"});
  for (const FitParameter& p : r.parameters) {
    t.add_row({p.name, fixed(p.start, 3), fixed(p.estimate, 3), se_text(p.std_error)});
  }
  t.write(out);
  if (r.parameters.size() > 1) {
    out << "\nCorrelation\n";
    std::vector<std::string> head{""};
    for (const FitParameter& p : r.parameters) head.push_back(p.name);
    TextTable c(head);
    for (std::size_t a = 0; a < r.parameters.size(); ++a) {
      std::vector<std::string> row{r.parameters[a].name};
      for (std::size_t b = 0; b < r.parameters.size(); ++b) {
        row.push_back(fixed(r.correlation(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b)), 3));
      }
      c.add_row(row);
    }
    c.write(out);
  }
  out << "\nResiduals (log10 mol/L)\n";
  TextTable res({"pH", "T (°C)", "observed", "fitted", "residual", "limiting solid"});
  for (const FitResidual& x : r.residuals) {
    res.add_row({fixed(x.pH, 2), fixed(x.temperature_C, 1), fixed(x.observed_log10, 3),
                 fixed(x.fitted_log10, 3), fixed(x.observed_log10 - x.fitted_log10, 3), x.limiting_solid});
  }
  res.write(out);
  out << "\n  rms " << fixed(r.rms_log10, 3) << " log10 over " << r.residuals.size() << " points";
  if (std::isfinite(r.residual_sd)) {
    out << "; residual sd " << fixed(r.residual_sd, 3) << " (" << r.degrees_of_freedom << " degrees of freedom)";
  }
  out << "\n";
  if (!r.warnings.empty()) {
    out << "\nWarnings\n";
    for (const std::string& w : r.warnings) out << "  - " << w << "\n";
  }
  out << "\n" << caution_text() << "\n";
}

void write_fit_csv(const FitResult& r, std::ostream& out) {
  write_csv_row(out, {"parameter", "start", "estimate", "std_error"});
  for (const FitParameter& p : r.parameters) {
    write_csv_row(out, {p.name, sig(p.start, 8), sig(p.estimate, 8), std::isfinite(p.std_error) ? sig(p.std_error, 4) : ""});
  }
  out << "\r\n";
  write_csv_row(out, {"pH", "temperature_C", "observed_log10_mol_per_L", "fitted_log10_mol_per_L",
                      "residual_log10", "limiting_solid"});
  for (const FitResidual& x : r.residuals) {
    write_csv_row(out, {sig(x.pH, 6), sig(x.temperature_C, 6), sig(x.observed_log10, 8), sig(x.fitted_log10, 8),
                        sig(x.observed_log10 - x.fitted_log10, 6), x.limiting_solid});
  }
}

void write_fit_json(const FitResult& r, std::ostream& out) {
  using J = nlohmann::ordered_json;
  auto num = [](double v) { return std::isfinite(v) ? J(v) : J(nullptr); };
  J j;
  j["status"] = r.status == FitStatus::kConverged ? "converged"
                : r.status == FitStatus::kMaxIterations ? "max-iterations" : "failure";
  j["message"] = r.message;
  j["data_source"] = r.data_source;
  J ps = J::array();
  for (const FitParameter& p : r.parameters) {
    ps.push_back({{"name", p.name}, {"estimate", p.estimate}, {"std_error", num(p.std_error)}, {"start", p.start}});
  }
  j["parameters"] = ps;
  J corr = J::array();
  for (Eigen::Index a = 0; a < r.correlation.rows(); ++a) {
    J row = J::array();
    for (Eigen::Index b = 0; b < r.correlation.cols(); ++b) row.push_back(num(r.correlation(a, b)));
    corr.push_back(row);
  }
  j["correlation"] = corr;
  j["rms_log10"] = r.rms_log10;
  j["residual_sd_log10"] = num(r.residual_sd);
  j["degrees_of_freedom"] = r.degrees_of_freedom;
  j["iterations"] = r.iterations;
  J res = J::array();
  for (const FitResidual& x : r.residuals) {
    res.push_back({{"pH", x.pH},
                   {"observed_log10", x.observed_log10},
                   {"fitted_log10", x.fitted_log10},
                   {"temperature_C", x.temperature_C},
                   {"limiting_solid", x.limiting_solid}});
  }
  j["residuals"] = res;
  j["warnings"] = r.warnings;
  j["caution"] = caution_text();
  out << j.dump(2) << "\n";
}

}  // namespace pkarta
