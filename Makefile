# eigenframe: one plain Makefile. Targets: all demo test bench coverage clean.
# Options: SANITIZE=1 (AddressSanitizer + UndefinedBehaviorSanitizer), COVERAGE=1.

CC      ?= cc
PYTHON  ?= /usr/bin/python3
OPT     ?= -O2 -g

WARN = -Wall \
       -Wextra \
       -Wshadow \
       -Wundef \
       -Wwrite-strings \
       -Wstrict-prototypes \
       -Wmissing-prototypes \
       -Wdouble-promotion \
       -Wno-sign-conversion

PKGS     = libfyaml hdf5 arpack lapacke openblas
DEPS_OK := $(shell pkg-config --exists $(PKGS) cmocka 2>/dev/null && \
                   test -f /usr/include/suitesparse/cholmod.h && \
                   $(PYTHON) -c 'import numpy, scipy, h5py, yaml, pytest' 2>/dev/null && echo yes)

PKG_CFLAGS = $(shell pkg-config --cflags $(PKGS) 2>/dev/null) -I/usr/include/suitesparse
PKG_LIBS   = $(shell pkg-config --libs $(PKGS) 2>/dev/null) -lcholmod -lm

CFLAGS  += -std=c11 $(OPT) $(WARN) -Iinclude -Isrc $(PKG_CFLAGS) -MMD -MP
LDLIBS  += $(PKG_LIBS)

ifeq ($(SANITIZE),1)
  CFLAGS  += -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=undefined
  LDFLAGS += -fsanitize=address,undefined
  BUILD   := build/san
  BIN     := build/san/eigenframe
else ifeq ($(COVERAGE),1)
  CFLAGS  += --coverage -O0
  LDFLAGS += --coverage
  BUILD   := build/cov
  BIN     := build/cov/eigenframe
else
  BUILD   := build/rel
endif
ifeq ($(WERROR),1)
  CFLAGS  += -Werror
endif

LIB_SRC  = $(wildcard src/*.c)
LIB_OBJ  = $(LIB_SRC:src/%.c=$(BUILD)/src/%.o)
LIB      = $(BUILD)/libeigenframe.a
CLI_SRC  = $(wildcard src/cli/*.c)
CLI_OBJ  = $(CLI_SRC:src/%.c=$(BUILD)/src/%.o)
BIN     ?= bin/eigenframe
UNIT_SRC = $(wildcard tests/unit/test_*.c)
UNIT_BIN = $(UNIT_SRC:tests/unit/%.c=$(BUILD)/tests/%)
TEST_LIBS = $(shell pkg-config --libs cmocka 2>/dev/null)

.PHONY: all deps demo test unit-tests check-models bench coverage clean

all: $(BIN)

deps:
ifneq ($(DEPS_OK),yes)
	sh scripts/install-deps.sh
endif

$(BUILD)/src/%.o: src/%.c
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -c $< -o $@

$(LIB): $(LIB_OBJ)
	@mkdir -p $(dir $@)
	rm -f $@ && ar rcs $@ $^

$(BIN): $(CLI_OBJ) $(LIB)
	@mkdir -p $(dir $@)
	$(CC) $(LDFLAGS) $(CLI_OBJ) $(LIB) $(LDLIBS) -o $@

$(BUILD)/tests/%: tests/unit/%.c tests/support.h $(LIB)
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS) -Itests $< $(LIB) $(LDFLAGS) $(LDLIBS) $(TEST_LIBS) -o $@

demo: deps
	$(MAKE) all
	sh scripts/demo.sh

# The whole suite: unit tests (cmocka), model golden files, Python reference checks.
test: deps
	$(MAKE) WERROR=1 all $(UNIT_BIN)
	EF_BIN=$(BIN) EF_BUILD=$(BUILD) PYTHON=$(PYTHON) sh scripts/run-tests.sh $(UNIT_BIN)

bench: deps
	$(MAKE) all
	$(PYTHON) scripts/bench.py $(if $(FULL),--full)

coverage:
	$(MAKE) COVERAGE=1 test

clean:
	rm -rf build bin

-include $(LIB_OBJ:.o=.d) $(CLI_OBJ:.o=.d)
