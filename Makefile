# psik - build, test, docs. GNU make. See DEVELOPERS.md.
#
#   make            libraries (build/lib) and the psik tool (build/bin/psik)
#   make check      every test, then one line "N passed, N failed"
#   make demo       the main job on the bundled demo data
#   make docs       Doxygen HTML in build/docs (fails on any warning)
#   make bench      speed, as ratios to a baseline run in the same process
#   make single     build/include/psik_single.h, the header-only form (tools/mksingle.py)
#   make install    PREFIX=/usr/local DESTDIR= : headers, libraries, psik.pc

CC       ?= cc
CXX      ?= c++
STD      ?= c99
OPT      ?= -O2
WARN      = -Wall -Wextra -Wpedantic -Werror
CFLAGS_LIB = -std=$(STD) $(OPT) $(WARN) -fPIC -fvisibility=hidden -DPSIK_BUILDING -Iinclude -Ilib
CFLAGS_T  = -std=$(STD) $(OPT) -g $(WARN) -Iinclude -Ilib -Itests/unit
LDLIBS    = -lm
SAN       = -fsanitize=address,undefined -fno-sanitize-recover=all -fno-omit-frame-pointer

VERSION  := $(shell sed -n 's/^\#define PSIK_VERSION "\(.*\)"/\1/p' include/psik.h)
# SONAME major = the binary interface version (PSIK_ABI_VERSION); the file
# name adds the minor and patch of the release: libpsik.so.1.<minor>.<patch>.
SOMAJOR  := $(shell sed -n 's/^\#define PSIK_ABI_VERSION \([0-9]*\)/\1/p' include/psik.h)
SOVER    := $(SOMAJOR).$(word 2,$(subst ., ,$(VERSION))).$(word 3,$(subst ., ,$(VERSION)))
B        := build

# Library sources: every lib/*.c is one concern (DEVELOPERS.md).
LIB_SRC  := $(sort $(wildcard lib/*.c))
LIB_OBJ  := $(LIB_SRC:lib/%.c=$(B)/obj/%.o)
LIB_A    := $(B)/lib/libpsik.a
LIB_SO   := $(B)/lib/libpsik.so
LIB_SOV  := $(B)/lib/libpsik.so.$(SOVER)
LIB_SOM  := $(B)/lib/libpsik.so.$(SOMAJOR)

# Unit tests: tests/unit/test_*.c, each a cmocka program; helpers in
# tests/unit/*.c that are not test_*.c are linked into every test.
T_SRC    := $(sort $(wildcard tests/unit/test_*.c))
T_HELP   := $(filter-out $(T_SRC),$(sort $(wildcard tests/unit/*.c)))
T_BIN    := $(T_SRC:tests/unit/%.c=$(B)/tests/%)
T_ASAN   := $(T_SRC:tests/unit/%.c=$(B)/asan/%)

CLI_SRC  := $(sort $(wildcard examples/cli/*.c))
CLI_BIN  := $(B)/bin/psik

.PHONY: all lib check test-unit test-asan test-cxx demo docs bench clean deps
all: lib $(if $(CLI_SRC),$(CLI_BIN))

lib: $(LIB_A) $(LIB_SO)

$(B)/obj/%.o: lib/%.c include/psik.h lib/psik_internal.h
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS_LIB) -MMD -MP -c $< -o $@

# Vectorised kernels (lib/batch_*.c, lib/blocks.c, lib/table.c): the loop vectoriser on,
# no errno from sqrt, and no contraction into fused multiply-adds, so the
# scalar, SSE2, AVX2 and AVX-512 paths give the same bits (no -ffast-math).
FAST_FLAGS := -O3 -fno-math-errno -ffp-contract=off
FAST_OBJ := $(filter $(B)/obj/batch_%.o $(B)/obj/point_%.o $(B)/obj/blocks.o $(B)/obj/table.o,$(LIB_OBJ))
$(FAST_OBJ): CFLAGS_LIB += $(FAST_FLAGS)
$(FAST_OBJ): lib/fastmath.h lib/fastmath_tables.h lib/fast_vg.h lib/isa.h lib/fast_block.h

# On x86-64 every lib/batch_*.c is compiled again per instruction set
# (lib/isa.h): the ordinary object holds the portable loop and the
# run-time choice, $(B)/obj/<file>-<isa>.o the wider ones. Explicit
# __builtin_fma only where a product must be exact or the kernel says so;
# contraction stays off everywhere. The AVX-512 variant is tuned for a
# processor whose gathers are fast (generic tuning emulates table lookups
# with scalar loads); tuning changes scheduling only, never the results.
ISA_X86  := $(if $(findstring x86_64,$(shell $(CC) -dumpmachine)),1)
ISA_LIST := $(if $(ISA_X86),sse42 avx2 avx512)
ISA_sse42  := -msse4.2
# The FMA variants' kernels are long chains of dependent operations over a few
# independent heads per iteration (batch_vg.c): scheduling before register
# allocation interleaves the chains, which the processor's reorder window
# cannot do across a whole chain (vgm batch 12.6x -> 15-17x, AVX2 6.7x ->
# 8.9x on the bench machine); SSE4.2, with 16 two-lane registers, gets slower.
# GCC only (clang schedules before allocation anyway, and refuses the flags).
ISA_SCHED  := $(if $(filter-out 0,$(shell $(CC) -v 2>&1 | grep -c '^gcc version')),-fschedule-insns -fsched-pressure)
ISA_avx2   := -mavx2 -mfma $(ISA_SCHED)
ISA_avx512 := -mavx512f -mavx512dq -mavx512vl -mavx512bw -mavx2 -mfma -mprefer-vector-width=512 -mtune=icelake-server $(ISA_SCHED)
BATCH_SRC := $(sort $(wildcard lib/batch_*.c lib/point_*.c))
ISA_OBJ  := $(foreach v,$(ISA_LIST),$(BATCH_SRC:lib/%.c=$(B)/obj/%-$(v).o))
LIB_OBJ  += $(ISA_OBJ)
$(if $(ISA_X86),$(LIB_SRC:lib/%.c=$(B)/obj/%.o)): CFLAGS_LIB += -DPSIK_ISA_VARIANTS
define isa_rule
$(B)/obj/%-$(1).o: lib/%.c include/psik.h lib/psik_internal.h lib/fastmath.h lib/fastmath_tables.h lib/fast_vg.h lib/isa.h lib/fast_block.h
	@mkdir -p $$(dir $$@)
	$$(CC) $$(CFLAGS_LIB) $$(FAST_FLAGS) $$(ISA_$(1)) -DPSIK_ISA_NAME=$(1) -MMD -MP -c $$< -o $$@
endef
$(foreach v,$(ISA_LIST),$(eval $(call isa_rule,$(v))))
# header dependencies as the compiler saw them
-include $(LIB_OBJ:.o=.d)

$(LIB_A): $(LIB_OBJ)
	@mkdir -p $(dir $@)
	rm -f $@
	ar rcs $@ $^

$(LIB_SOV): $(LIB_OBJ) lib/psik.map
	@mkdir -p $(dir $@)
	$(CC) -shared -Wl,-soname,libpsik.so.$(SOMAJOR) -Wl,--version-script=lib/psik.map \
	    -Wl,--no-undefined -o $@ $(LIB_OBJ) $(LDLIBS)

$(LIB_SO): $(LIB_SOV)
	ln -sf libpsik.so.$(SOVER) $(LIB_SOM)
	ln -sf libpsik.so.$(SOMAJOR) $@

$(CLI_BIN): $(CLI_SRC) $(LIB_A)
	@mkdir -p $(dir $@)
	$(CC) -std=$(STD) $(OPT) $(WARN) -Iinclude -o $@ $(CLI_SRC) $(LIB_A) $(LDLIBS)

# ---------------------------------------------------------------- tests
# make check installs what the tests need (deps), builds the tests plainly
# and under AddressSanitizer + UBSan, runs everything and prints the total.
check: deps all
	@$(MAKE) --no-print-directory test-build
	@sh tests/run_all.sh $(B)

deps:
	@sh tests/deps.sh

.PHONY: test-build
test-build: $(T_BIN) $(T_ASAN) $(B)/tests/cxx_header $(B)/tests/c11_header $(SINGLE) \
            $(if $(ISA_X86),$(B)/tests/test_fastmath_fma $(B)/tests/test_fastmath_scalar_fma)

# fastmath.h as the FMA variants compile it (table-free exp)
$(B)/tests/test_fastmath_fma: tests/unit/test_fastmath.c lib/fastmath.h lib/fastmath_tables.h
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS_T) $(FAST_FLAGS) $(ISA_avx2) -o $@ $< -lcmocka $(LDLIBS)

# fastmath_scalar.h as the FMA variants compile it
$(B)/tests/test_fastmath_scalar_fma: tests/unit/test_fastmath_scalar.c lib/fastmath_scalar.h \
                                     lib/fastmath_scalar_tables.h lib/fastmath.h
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS_T) $(FAST_FLAGS) $(ISA_avx2) -o $@ $< -lcmocka $(LDLIBS)

$(B)/tests/%: tests/unit/%.c $(T_HELP) $(LIB_A) tests/unit/*.h
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS_T) -o $@ $< $(T_HELP) $(LIB_A) -lcmocka $(LDLIBS)

# The sanitizer builds compile the library sources once (portable
# variant only: no per-instruction-set objects) and link each test.
ASAN_OBJ := $(LIB_SRC:lib/%.c=$(B)/asan/obj/%.o)
$(B)/asan/obj/%.o: lib/%.c
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS_T) -O1 $(SAN) -MMD -MP -c $< -o $@
-include $(ASAN_OBJ:.o=.d)
.SECONDARY: $(ASAN_OBJ)

$(B)/asan/%: tests/unit/%.c $(T_HELP) $(ASAN_OBJ) tests/unit/*.h include/psik.h lib/psik_internal.h
	@mkdir -p $(dir $@)
	$(CC) $(CFLAGS_T) -O1 $(SAN) -Ilib -o $@ $< $(T_HELP) $(ASAN_OBJ) -lcmocka $(LDLIBS)

# The public header compiles as C++ and as C11 (DESIGN.md).
$(B)/tests/cxx_header: tests/header/header_cxx.cpp include/psik.h $(LIB_A)
	@mkdir -p $(dir $@)
	$(CXX) -std=c++11 -Wall -Wextra -Wpedantic -Werror -Iinclude -o $@ $< $(LIB_A) $(LDLIBS)

$(B)/tests/c11_header: tests/header/header_c11.c include/psik.h $(LIB_A)
	@mkdir -p $(dir $@)
	$(CC) -std=c11 -Wall -Wextra -Wpedantic -Werror -Iinclude -o $@ $< $(LIB_A) $(LDLIBS)

# ---------------------------------------------------------------- embedding
# The single-header form, generated from the same sources (tools/mksingle.py).
SINGLE   := $(B)/include/psik_single.h
.PHONY: single
single: $(SINGLE)

$(SINGLE): tools/mksingle.py include/psik.h $(wildcard lib/*.h) $(LIB_SRC)
	/usr/bin/python3 tools/mksingle.py -o $@

# make install PREFIX=/usr/local DESTDIR=: headers (psik.h, psik_single.h),
# libpsik.a, libpsik.so.$(SOVER) with its links, psik.pc, the Fortran module
# source, and the psik tool when it is built.
PREFIX     ?= /usr/local
LIBDIR     ?= $(PREFIX)/lib
INCLUDEDIR ?= $(PREFIX)/include
BINDIR     ?= $(PREFIX)/bin
DATADIR    ?= $(PREFIX)/share/psik
PCDIR      ?= $(LIBDIR)/pkgconfig
.PHONY: install uninstall
install: all $(SINGLE)
	sed -e 's|@PREFIX@|$(PREFIX)|' -e 's|@LIBDIR@|$(LIBDIR)|' -e 's|@INCLUDEDIR@|$(INCLUDEDIR)|' \
	    -e 's|@VERSION@|$(VERSION)|' lib/psik.pc.in > $(B)/psik.pc
	install -d '$(DESTDIR)$(INCLUDEDIR)' '$(DESTDIR)$(LIBDIR)' '$(DESTDIR)$(PCDIR)' '$(DESTDIR)$(DATADIR)/fortran'
	install -m 644 include/psik.h $(SINGLE) '$(DESTDIR)$(INCLUDEDIR)/'
	install -m 644 $(LIB_A) '$(DESTDIR)$(LIBDIR)/'
	install -m 755 $(LIB_SOV) '$(DESTDIR)$(LIBDIR)/'
	ln -sf libpsik.so.$(SOVER) '$(DESTDIR)$(LIBDIR)/libpsik.so.$(SOMAJOR)'
	ln -sf libpsik.so.$(SOMAJOR) '$(DESTDIR)$(LIBDIR)/libpsik.so'
	install -m 644 $(B)/psik.pc '$(DESTDIR)$(PCDIR)/'
	install -m 644 bindings/fortran/psik.f90 '$(DESTDIR)$(DATADIR)/fortran/'
	$(if $(CLI_SRC),install -d '$(DESTDIR)$(BINDIR)' && install -m 755 $(CLI_BIN) '$(DESTDIR)$(BINDIR)/')

uninstall:
	rm -f '$(DESTDIR)$(INCLUDEDIR)/psik.h' '$(DESTDIR)$(INCLUDEDIR)/psik_single.h' \
	    '$(DESTDIR)$(LIBDIR)/libpsik.a' '$(DESTDIR)$(LIBDIR)/libpsik.so' \
	    '$(DESTDIR)$(LIBDIR)/libpsik.so.$(SOMAJOR)' '$(DESTDIR)$(LIBDIR)/libpsik.so.$(SOVER)' \
	    '$(DESTDIR)$(PCDIR)/psik.pc' '$(DESTDIR)$(DATADIR)/fortran/psik.f90' \
	    $(if $(CLI_SRC),'$(DESTDIR)$(BINDIR)/psik')

# ---------------------------------------------------------------- threads
# The thread test needs pthreads; make check-tsan runs it under
# ThreadSanitizer (clang when present, else $(CC); CI calls this target).
$(B)/tests/test_threads $(B)/asan/test_threads: LDLIBS += -pthread
TSAN_CC ?= $(shell command -v clang >/dev/null 2>&1 && echo clang || echo $(CC))
.PHONY: check-tsan
check-tsan: $(B)/tsan/test_threads
	@TSAN_OPTIONS="halt_on_error=1" $(B)/tsan/test_threads

$(B)/tsan/test_threads: tests/unit/test_threads.c $(T_HELP) $(LIB_SRC) tests/unit/*.h include/psik.h lib/*.h
	@mkdir -p $(dir $@)
	$(TSAN_CC) -std=$(STD) -O1 -g -fsanitize=thread -pthread -Iinclude -Ilib -Itests/unit \
	    -o $@ $< $(T_HELP) $(LIB_SRC) -lcmocka -lm

# ---------------------------------------------------------------- bench
# Speed as ratios to a pow()-based baseline in the same process; never
# fails on speed (tests/bench/bench.c says how it measures). KINDS="vgm bcm"
# benches only those kinds.
BENCH_SRC := $(sort $(wildcard tests/bench/*.c))
bench: $(B)/bench/psik_bench
	@$(B)/bench/psik_bench $(KINDS)

$(B)/bench/psik_bench: $(BENCH_SRC) tests/bench/bench.h $(LIB_A)
	@mkdir -p $(dir $@)
	$(CC) -std=$(STD) $(OPT) $(WARN) -Iinclude -o $@ $(BENCH_SRC) $(LIB_A) $(LDLIBS)

# ---------------------------------------------------------------- demo, docs
# The main job: fit every model to the bundled drainage experiment, rank,
# plot, tabulate (examples/demo.sh; outputs in $(B)/demo). vg-demo runs the
# small evaluation example.
demo: all $(B)/bin/fit_api
	@sh examples/demo.sh $(B)

$(B)/bin/fit_api: examples/fit_api.c $(LIB_A)
	@mkdir -p $(dir $@)
	$(CC) -std=$(STD) $(OPT) $(WARN) -Iinclude -o $@ $< $(LIB_A) $(LDLIBS)

.PHONY: vg-demo
vg-demo: $(B)/bin/vg_demo
	@$(B)/bin/vg_demo

$(B)/bin/vg_demo: examples/vg_demo.c $(LIB_A)
	@mkdir -p $(dir $@)
	$(CC) -std=$(STD) $(OPT) $(WARN) -Iinclude -o $@ $< $(LIB_A) $(LDLIBS)

docs:
	@command -v doxygen >/dev/null || { echo "doxygen is missing: apt-get install doxygen"; exit 1; }
	@mkdir -p $(B)/docs
	doxygen Doxyfile > $(B)/docs/doxygen.log 2> $(B)/docs/warnings.log; \
	    st=$$?; cat $(B)/docs/warnings.log; \
	    if [ $$st -ne 0 ] || [ -s $(B)/docs/warnings.log ]; then echo "docs: doxygen reported warnings"; exit 1; fi
	@echo "docs: $(B)/docs/html/index.html"

clean:
	rm -rf $(B)
# ---------------------------------------------------------------- fuzzing
# libFuzzer targets (clang): the tool's CSV reader and psik_init +
# evaluation (+ a small fit) on arbitrary bytes; each runs FUZZ_SECONDS.
FUZZ_SECONDS ?= 60
FUZZ_CC  ?= clang
FUZZ_FLAGS = -g -O1 -fsanitize=fuzzer,address,undefined -fno-sanitize-recover=all
.PHONY: fuzz
fuzz: $(B)/fuzz/fuzz_csv $(B)/fuzz/fuzz_model
	@sh tests/fuzz/run.sh $(B) $(FUZZ_SECONDS)

$(B)/fuzz/fuzz_csv: tests/fuzz/fuzz_csv.c examples/cli/csv.c examples/cli/csv.h
	@mkdir -p $(dir $@)
	$(FUZZ_CC) $(FUZZ_FLAGS) -Iexamples/cli -o $@ tests/fuzz/fuzz_csv.c examples/cli/csv.c -lm

$(B)/fuzz/fuzz_model: tests/fuzz/fuzz_model.c $(LIB_SRC) include/psik.h lib/psik_internal.h
	@mkdir -p $(dir $@)
	$(FUZZ_CC) $(FUZZ_FLAGS) -Iinclude -Ilib -o $@ tests/fuzz/fuzz_model.c $(LIB_SRC) -lm

# ---------------------------------------------------------------- fit bench
# Fit time per data set against SciPy's least_squares on the same sets.
.PHONY: bench-fit
bench: bench-fit
bench-fit: $(B)/bench/bench_fit
	@sh tests/bench/fit/run.sh $(B)

$(B)/bench/bench_fit: tests/bench/fit/bench_fit.c $(LIB_A)
	@mkdir -p $(dir $@)
	$(CC) -std=$(STD) $(OPT) $(WARN) -Iinclude -o $@ $< $(LIB_A) $(LDLIBS)
