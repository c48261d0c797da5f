// `renorm checkpoint FILE`: where a checkpointed run stands (its request, the stages finished
// and their values, how far the running stage got), without running anything.
#include "commands.hpp"
#include "progress.hpp"

#include <renorm/io/checkpoint.hpp>
#include <renorm/solve/solve.hpp>

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>

namespace renorm::app {

namespace {

struct CheckpointArgs {
    std::string file;
    bool json = false;
};

const char* state_text(solve::StageStatus::State s)
{
    switch (s) {
    case solve::StageStatus::State::finished:
        return "finished";
    case solve::StageStatus::State::running:
        return "running";
    case solve::StageStatus::State::waiting:
        return "waiting";
    }
    return "";
}

/// 10^x as "1.9e-48" (x may be far below a double's range).
std::string power_of_ten_text(double x)
{
    double e = std::floor(x);
    double m = std::pow(10.0, x - e);
    if (m >= 9.95) { // would print as 10.0
        m = 1.0;
        e += 1;
    }
    char buf[48];
    std::snprintf(buf, sizeof buf, "%.1fe%ld", m, static_cast<long>(e));
    return buf;
}

/// What the running stage has done, in words.
std::string running_text(const solve::StageStatus& s)
{
    std::string t = std::to_string(s.step) + " Newton steps done (" + std::to_string(s.krylov_steps) +
                    " Krylov steps), the last aiming at " + std::to_string(std::lround(s.digits)) +
                    " digits at N = " + std::to_string(s.n);
    if (s.target_n > 0)
        t += ", to end at N = " + std::to_string(s.target_n);
    if (s.inner_steps >= 0)
        t += "; saved inside the next step (residual " +
             power_of_ten_text(s.step_log10_residual) + " at N = " + std::to_string(s.step_n) + ") after " +
             std::to_string(s.inner_steps) + " Krylov steps of its correction";
    return t;
}

int run_checkpoint(const CheckpointArgs& a)
{
    const io::Checkpoint c = io::read_checkpoint(a.file); // std::invalid_argument: exit 2
    const std::vector<solve::StageStatus> stages = solve::checkpoint_status(c);
    size_t finished = 0;
    for (const auto& s : stages)
        finished += s.state == solve::StageStatus::State::finished ? 1 : 0;
    if (a.json) {
        nlohmann::json j;
        j["file"] = a.file;
        j["order"] = c.order;
        j["digits"] = c.digits;
        j["eigenvalues"] = c.eigenvalues;
        j["basis"] = c.basis;
        j["written_by"] = {{"version", c.version}, {"commit", c.commit}};
        j["seconds"] = c.seconds >= 0 ? nlohmann::json(c.seconds) : nlohmann::json(nullptr);
        j["certified"] = false;
        nlohmann::json st = nlohmann::json::array();
        for (const auto& s : stages) {
            nlohmann::json e{{"name", s.name}, {"state", state_text(s.state)}};
            if (s.state == solve::StageStatus::State::finished) {
                e["N"] = s.n;
                e["precision_bits"] = s.prec;
                e["log10_residual"] = s.log10_residual;
                e["value"] = s.value;
            } else if (s.state == solve::StageStatus::State::running) {
                e["N"] = s.n;
                e["digits"] = s.digits;
                e["newton_steps"] = s.step;
                e["krylov_steps"] = s.krylov_steps;
                e["final_N"] = s.target_n;
                if (s.inner_steps >= 0)
                    e["unfinished_step"] = {{"N", s.step_n},
                                            {"log10_residual", s.step_log10_residual},
                                            {"krylov_steps", s.inner_steps}};
                else
                    e["unfinished_step"] = nullptr;
            }
            st.push_back(e);
        }
        j["stages"] = st;
        std::cout << j.dump(1) << "\n";
        return exit_ok;
    }
    std::cout << "checkpoint " << a.file << ": z = " << c.order << ", " << c.digits << " digits, " << c.eigenvalues
              << " eigenvalues after delta, " << c.basis << " basis\n"
              << "written by renorm " << c.version << " (commit " << c.commit << "); wall time of all sittings: "
              << (c.seconds >= 0 ? approx_duration_text(c.seconds)
                                 : std::string("unknown (the file was written before sittings were timed)"))
              << "\n"
              << "stages (" << finished << " of " << stages.size() << " finished):\n";
    for (const auto& s : stages) {
        std::cout << "  " << s.name << ": " << state_text(s.state);
        if (s.state == solve::StageStatus::State::finished)
            std::cout << ", N = " << s.n << ", " << s.prec << " bits, residual " << power_of_ten_text(s.log10_residual)
                      << ", value " << s.value << "...";
        else if (s.state == solve::StageStatus::State::running)
            std::cout << ", " << running_text(s);
        std::cout << "\n";
    }
    std::cout << "values are ESTIMATES of one truncation each (not certified); `renorm solve --resume "
              << a.file << "` continues the run\n";
    return exit_ok;
}

} // namespace

void register_checkpoint(CLI::App& app, int* code)
{
    auto args = std::make_shared<CheckpointArgs>();
    CLI::App* sub = app.add_subcommand(
        "checkpoint", "Show where a checkpointed run stands: its request, the stages finished and the running one");
    sub->add_option("FILE", args->file, "a checkpoint written by `renorm solve --checkpoint` or `renorm table "
                                        "--checkpoint`")
        ->required();
    sub->add_flag("--json", args->json, "print one JSON object on stdout");
    sub->footer("Reads the file (and checks its checksum) without running anything. A run goes through\n"
                "the stages fixed-point@N, fixed-point@1.2N, delta@N, delta@1.2N, then\n"
                "eigenvalue-K@N and eigenvalue-K@1.2N for each eigenvalue asked for (those that turn\n"
                "out complex are skipped). For each finished stage it shows the truncation N, the\n"
                "precision, the residual and the value (alpha, or the eigenvalue) to 20 digits; for\n"
                "the running stage, the Newton and Krylov steps done and the digits reached.\n\n"
                "Example:\n"
                "  renorm checkpoint d10k.ckpt\n"
                "  renorm checkpoint d10k.ckpt --json");
    sub->callback([args, code] { *code = run_checkpoint(*args); });
}

} // namespace renorm::app
