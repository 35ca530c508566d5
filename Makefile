# Thin wrapper around CMake. `make demo` runs the demo, `make test` runs every test.
BUILD ?= build
MAKEFLAGS += --no-print-directory
JOBS ?= $(shell nproc 2>/dev/null || echo 2)
PACKAGES := cmake g++ make libboost-program-options-dev libpugixml-dev libeigen3-dev \
            libgtest-dev libgmock-dev libbenchmark-dev nlohmann-json3-dev libxml2-utils \
            zlib1g-dev
TEST_PACKAGES := chromium

.PHONY: all deps test-deps configure build demo test bench clean

all: build

deps:
	@./tools/ensure-packages $(PACKAGES)

test-deps:
	@./tools/ensure-packages $(TEST_PACKAGES)

configure: deps
	@cmake -S . -B $(BUILD) -DCMAKE_BUILD_TYPE=Release >/dev/null

build: configure
	@cmake --build $(BUILD) -j $(JOBS)

demo: build
	@./$(BUILD)/pkarta demo

test: build test-deps
	@cd $(BUILD) && ctest --output-on-failure -j $(JOBS)

bench: build
	@./$(BUILD)/pkarta_bench

clean:
	rm -rf $(BUILD)
