# Thin wrappers over CMake. The README's two commands:
#   ./scripts/install-deps.sh && make demo
#   ./scripts/install-deps.sh && make test
BUILD ?= build
ASAN_BUILD ?= build-asan
JOBS ?= $(shell nproc 2>/dev/null || echo 2)
WERROR ?= OFF
CMAKE_ARGS ?=

.PHONY: all deps configure build demo test sanitize bench format format-check tidy clean

all: build

deps:
	./scripts/install-deps.sh

configure: deps
	cmake -S . -B $(BUILD) -DCMAKE_BUILD_TYPE=Release -DLOUPE_WERROR=$(WERROR) $(CMAKE_ARGS)

build: configure
	cmake --build $(BUILD) -j$(JOBS)

demo: build
	./$(BUILD)/apps/loupe demo --output-dir $(BUILD)/demo-study

test: build
	./scripts/fetch-test-data.sh
	cd $(BUILD) && ctest --output-on-failure -j$(JOBS) --timeout 900

# Unit and end-to-end tests under AddressSanitizer and UndefinedBehaviorSanitizer
# (the heavy reference cross-checks, named *Reference*, and the mpirun checks, named
# Mpi*, whose Open MPI allocations LeakSanitizer reports, run in `make test` only).
sanitize: deps
	cmake -S . -B $(ASAN_BUILD) -DCMAKE_BUILD_TYPE=RelWithDebInfo -DLOUPE_SANITIZE=ON -DLOUPE_WERROR=$(WERROR) -DLOUPE_BUILD_BENCH=OFF $(CMAKE_ARGS)
	cmake --build $(ASAN_BUILD) -j$(JOBS)
	cd $(ASAN_BUILD) && ASAN_OPTIONS=detect_leaks=1 UBSAN_OPTIONS=print_stacktrace=1 ctest --output-on-failure -j$(JOBS) -E 'Reference|Mpi' --timeout 900

bench: build
	./bench/run-benchmarks.sh $(BUILD)

FORMATTED = $(shell git ls-files '*.h' '*.cc' 2>/dev/null)
format:
	clang-format -i $(FORMATTED)

format-check:
	clang-format --dry-run -Werror $(FORMATTED)

tidy: configure
	clang-tidy -p $(BUILD) --quiet $(shell git ls-files 'lib/*.cc' 'apps/*.cc' 'graph/*.cc' 2>/dev/null)

clean:
	rm -rf $(BUILD) $(ASAN_BUILD)
