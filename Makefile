# sedgrade - build, test and check. See DEVELOPERS.md.
# Core and io sources build libsedgrade.a; src/cli/*.c builds the program.

CC       ?= cc
PREFIX   ?= /usr/local
BUILD    ?= build
SANITIZE ?=

PKGS     := gsl cairo fontconfig
WARN     := -Wall -Wextra -Wpedantic -Werror -Wshadow -Wstrict-prototypes -Wdouble-promotion \
            -Wformat=2 -Wvla
CFLAGS   ?= -O2 -g
CFLAGS   += -std=c11 -D_POSIX_C_SOURCE=200809L $(WARN) -Iinclude -Isrc -MMD -MP \
            $(shell pkg-config --cflags $(PKGS)) -pthread
LDLIBS   := $(shell pkg-config --libs $(PKGS)) -lcsv -lm -pthread
ifneq ($(SANITIZE),)
CFLAGS   += -fsanitize=$(SANITIZE) -fno-omit-frame-pointer -fno-sanitize-recover=all
LDFLAGS  += -fsanitize=$(SANITIZE)
endif

VERSION  := $(shell cat VERSION 2>/dev/null || echo 0.0.0)
CFLAGS   += -DSG_VERSION='"$(VERSION)"'

LIB_SRC  := $(wildcard src/*.c src/io/*.c)
CLI_SRC  := $(wildcard src/cli/*.c)
TEST_SRC := $(wildcard tests/test_*.c)
BENCH_SRC:= $(wildcard bench/*.c)

LIB_OBJ  := $(LIB_SRC:%.c=$(BUILD)/%.o)
CLI_OBJ  := $(CLI_SRC:%.c=$(BUILD)/%.o)
TEST_BIN := $(TEST_SRC:tests/%.c=$(BUILD)/tests/%)
BENCH_BIN:= $(BENCH_SRC:bench/%.c=$(BUILD)/bench/%)
LIB      := $(BUILD)/libsedgrade.a
PROG     := $(BUILD)/sedgrade

.PHONY: all test check leakcheck lint format demo bench install clean fuzz
all: $(PROG)

# V=1 shows the full commands.
V ?= 0
ifeq ($(V),0)
Q := @
endif

$(BUILD)/%.o: %.c
	@mkdir -p $(dir $@)
	@$(if $(Q),echo "  CC  $<")
	$(Q)$(CC) $(CFLAGS) -c $< -o $@

$(LIB): $(LIB_OBJ)
	@mkdir -p $(dir $@)
	$(Q)rm -f $@
	$(Q)ar rcs $@ $^

$(PROG): $(CLI_OBJ) $(LIB)
	$(Q)$(CC) $(LDFLAGS) -o $@ $(CLI_OBJ) $(LIB) $(LDLIBS)

# Tests: one Criterion program per module. The classic assert macros are used
# so -Wconversion stays off for tests (TOOLCHAIN.md).
$(BUILD)/tests/%: tests/%.c $(LIB)
	@mkdir -p $(dir $@)
	@$(if $(Q),echo "  CC  $<")
	$(Q)$(CC) $(CFLAGS) -DSG_SOURCE_DIR='"$(CURDIR)"' $< -o $@ $(LIB) $(LDFLAGS) $(LDLIBS) \
	    $(shell pkg-config --libs criterion)

$(BUILD)/bench/%: bench/%.c $(LIB)
	@mkdir -p $(dir $@)
	$(Q)$(CC) $(CFLAGS) $< -o $@ $(LIB) $(LDFLAGS) $(LDLIBS)

# make test: every module's Criterion tests, then the golden CLI cases.
test: $(TEST_BIN) $(PROG)
	@bash tests/run_tests.sh $(BUILD)

# make check: the same tests under AddressSanitizer and UndefinedBehaviorSanitizer.
check:
	$(MAKE) BUILD=build-san SANITIZE=address,undefined test

# make leakcheck: the tests and the CLI cases under valgrind.
leakcheck: $(TEST_BIN) $(PROG)
	@bash tests/run_valgrind.sh $(BUILD)

lint:
	cppcheck --quiet --error-exitcode=1 --enable=warning,performance,portability \
	    --suppress=unknownMacro --suppress=missingIncludeSystem -Iinclude -Isrc src include
	clang-tidy $(LIB_SRC) $(CLI_SRC) -- -std=c11 -D_POSIX_C_SOURCE=200809L -Iinclude -Isrc \
	    $(shell pkg-config --cflags $(PKGS))

format:
	clang-format -i $(LIB_SRC) $(CLI_SRC) $(TEST_SRC) include/sedgrade/*.h src/*.h src/io/*.h 2>/dev/null || true

demo: $(PROG)
	./$(PROG) reduce demo/records -o demo/out --calibration calibration --plot png --plot svg --report \
	    --mc 20000 --seed 1 || test $$? -eq 1

bench: $(BENCH_BIN) $(PROG)
	@bash bench/run.sh $(BUILD)

fuzz:
	@bash fuzz/run.sh $${FUZZ_SECONDS:-60}

install: $(PROG)
	install -d $(DESTDIR)$(PREFIX)/bin $(DESTDIR)$(PREFIX)/share/man/man1
	install -m 755 $(PROG) $(DESTDIR)$(PREFIX)/bin/sedgrade
	install -m 644 doc/sedgrade.1 $(DESTDIR)$(PREFIX)/share/man/man1/sedgrade.1

clean:
	rm -rf build build-san

-include $(LIB_OBJ:.o=.d) $(CLI_OBJ:.o=.d) $(TEST_BIN:=.d)
