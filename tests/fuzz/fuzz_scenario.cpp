// Scenario loading from YAML text (study/scenario.hpp). Properties:
//  - the only exception is InputError, and it names the scenario file;
//  - loading is a function of the text: loading it twice describes the same
//    scenario.
#include <cstdint>
#include <string>

#include "fuzz_support.hpp"
#include "models/errors.hpp"
#include "study/scenario.hpp"

using namespace tocsin;
using tocsin::fuzz::broken;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    const std::string text(reinterpret_cast<const char*>(data), size);
    const std::string label = "fuzz.yaml";
    const std::string dir = tocsin::fuzz::scratch().dir().string();
    std::string first;
    for (int pass = 0; pass < 2; ++pass) {
        try {
            const std::string described = describe_scenario(parse_scenario(text, label, dir));
            if (pass == 1 && described != first) broken("loading the same text twice describes it differently");
            first = described;
        } catch (const InputError& e) {
            if (e.file != label) broken("scenario error names '" + e.file + "', not " + label + ": " + e.what());
            return 0;
        } catch (const std::exception& e) {
            broken(std::string("scenario loading threw something other than InputError: ") + e.what());
        }
    }
    return 0;
}
