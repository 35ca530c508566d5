# Thin wrapper around CMake. `make demo` builds pkarta and runs the demo; `make test` builds and
# runs every test. Run as root, each installs the Debian packages it needs (tools/ensure-packages).
BUILD ?= build
MAKEFLAGS += --no-print-directory
JOBS ?= $(shell nproc 2>/dev/null || echo 2)
# To build and run pkarta.
PACKAGES := cmake g++ make libboost-program-options-dev libpugixml-dev libeigen3-dev \
            nlohmann-json3-dev
# Only for the tests and the benchmarks.
TEST_PACKAGES := libgtest-dev libgmock-dev libbenchmark-dev libxml2-utils zlib1g-dev \
                 pkg-config help2man chromium pybind11-dev python3-dev python3-pandas \
                 python3-jsonschema
# Where `make demo` writes its reports (the committed example in reports/ is refreshed by
# `make example`, and checked by the report test).
DEMO_OUT ?= $(BUILD)/demo-reports
EXAMPLE_EPOCH := 1796083200

.PHONY: all deps test-deps configure configure-tests build demo example test bench install clean

all: build

deps:
	@./tools/ensure-packages $(PACKAGES)

test-deps: deps
	@./tools/ensure-packages $(TEST_PACKAGES)

configure: deps
	@cmake -S . -B $(BUILD) -DCMAKE_BUILD_TYPE=Release >/dev/null

configure-tests: test-deps
	@cmake -S . -B $(BUILD) -DCMAKE_BUILD_TYPE=Release -DPKARTA_BUILD_TESTS=ON \
	  -DPKARTA_BUILD_BENCHMARKS=ON -DPKARTA_PYTHON=ON >/dev/null

# Only the library and the pkarta binary (no test or benchmark targets).
build: configure
	@cmake --build $(BUILD) -j $(JOBS) --target pkarta

demo: build
	@./$(BUILD)/pkarta demo --out-dir $(DEMO_OUT)

example: build
	@SOURCE_DATE_EPOCH=$(EXAMPLE_EPOCH) ./$(BUILD)/pkarta demo --out-dir $(BUILD)/example-reports >/dev/null
	@rm -rf reports/demo-base reports/demo-base.html
	@cp -r $(BUILD)/example-reports/demo-base $(BUILD)/example-reports/demo-base.html reports/
	@echo "reports/demo-base.html and reports/demo-base/ regenerated"

test: configure-tests
	@cmake --build $(BUILD) -j $(JOBS)
	@cd $(BUILD) && ctest --output-on-failure -j $(JOBS)

bench: configure-tests
	@cmake --build $(BUILD) -j $(JOBS) --target pkarta_bench
	@./$(BUILD)/pkarta_bench

PREFIX ?= /usr/local
install: build
	@cmake --install $(BUILD) --prefix $(PREFIX)

clean:
	rm -rf $(BUILD)
