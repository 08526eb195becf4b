// How many of a model's chains reach the same conclusion: in all chains, in most
// (more than half) or split. One definition for every command, the study and the report.
#pragma once

#include <cstddef>
#include <span>
#include <string>

namespace loupe {

enum class ChainAgreement { all, most, split };

// "all chains", "most chains" or "split".
std::string agreement_label(ChainAgreement agreement);

// Of `chains` chains, `backing` reach the conclusion: all of them, more than
// half, or otherwise split. Example: (4, 4) -> all; (3, 4) -> most; (2, 4) -> split.
ChainAgreement agreement_of(std::size_t backing, std::size_t chains);

// The conclusion most chains reach, and how many reach it.
struct ModalConclusion {
  std::string conclusion;   // "" when there are no chains
  std::size_t backing = 0;  // chains reaching it
  std::size_t chains = 0;   // chains in all
  ChainAgreement agreement = ChainAgreement::split;
};

// The most frequent of the chains' conclusions (ties: the one a lower-numbered
// chain reached first). Example: {"a", "b", "a"} -> "a", 2 of 3, most.
ModalConclusion modal_conclusion(std::span<const std::string> conclusion_per_chain);

// "all 4 chains", "both chains", "3 of 4 chains", "2 of 4 chains (split)", "1 chain".
std::string describe_backing(std::size_t backing, std::size_t chains);

// A permutation test's conclusion on one chain at a level: "p <= 0.05" or
// "p > 0.05" (the adjusted p-value when the test has one), "no p-value" for NaN.
std::string significance_conclusion(double p_value, double adjusted_p_value, double level);

}  // namespace loupe
