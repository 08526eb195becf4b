#include "analysis/chain_agreement.h"

#include <cmath>
#include <cstdio>

namespace loupe {

std::string agreement_label(ChainAgreement agreement) {
  switch (agreement) {
    case ChainAgreement::all:
      return "all chains";
    case ChainAgreement::most:
      return "most chains";
    case ChainAgreement::split:
      break;
  }
  return "split";
}

ChainAgreement agreement_of(std::size_t backing, std::size_t chains) {
  if (chains > 0 && backing == chains) return ChainAgreement::all;
  if (2 * backing > chains) return ChainAgreement::most;
  return ChainAgreement::split;
}

ModalConclusion modal_conclusion(std::span<const std::string> conclusion_per_chain) {
  ModalConclusion modal;
  modal.chains = conclusion_per_chain.size();
  for (std::size_t i = 0; i < conclusion_per_chain.size(); ++i) {
    std::size_t count = 0;
    for (const auto& c : conclusion_per_chain) count += c == conclusion_per_chain[i] ? 1 : 0;
    if (count > modal.backing) {
      modal.backing = count;
      modal.conclusion = conclusion_per_chain[i];
    }
  }
  modal.agreement = agreement_of(modal.backing, modal.chains);
  return modal;
}

std::string describe_backing(std::size_t backing, std::size_t chains) {
  if (chains == 1) return backing == 1 ? "1 chain" : "0 of 1 chain";
  if (backing == chains) return chains == 2 ? "both chains" : "all " + std::to_string(chains) + " chains";
  std::string text = std::to_string(backing) + " of " + std::to_string(chains) + " chains";
  if (agreement_of(backing, chains) == ChainAgreement::split) text += " (split)";
  return text;
}

std::string significance_conclusion(double p_value, double adjusted_p_value, double level) {
  const double p = std::isfinite(adjusted_p_value) ? adjusted_p_value : p_value;
  if (!std::isfinite(p)) return "no p-value";
  char text[32];
  std::snprintf(text, sizeof text, "%g", level);
  return std::string(p <= level ? "p <= " : "p > ") + text;
}

}  // namespace loupe
