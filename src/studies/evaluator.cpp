// The physics the ranking uses by default, kept in its own file so that tests with a synthetic
// evaluator do not need the converter.
#include "studies/rank.hpp"

namespace coilsieve::studies {

PairEvaluatorFn default_evaluator() {
    return [](const design::Design& d, const PreparedParts& p) {
        return optimisation::PairEvaluator([&d, &l = p.inductor, &diode = p.diode,
                                            &lm = p.inductor_model, &dm = p.diode_model,
                                            &corners = p.corners](const converter::Setting& s) {
            return converter::evaluate_pair(d, l, diode, lm, dm, corners, s);
        });
    };
}

} // namespace coilsieve::studies
