# halostage build. Plain make; sources are discovered by folder so that a new
# file needs no Makefile edit:
#   calc/*.c        -> build/libhc.a   (pure science)
#   protocol/*.c    -> build/libhp.a   (Modbus, MQTT, JSON)
#   plugin/*.c      -> build/libhs.a and build/halostage.so
#   plugin/web/*    -> embedded in both as byte arrays (mk/embed.sh)
#   plugin/cli/*.c  -> build/halostage
#   plugin/host/*.c -> build/halostaged
#   tests/sim/*.c   -> build/halostage-sim
#   tests/unit/test_*.c  -> build/tests/test_*  (cmocka; each file one binary)
#   tests/unit/support/*.c are linked into every unit test
#   tests/bench/bench_*.c -> build/bench/bench_*
#   tests/tools/*.c -> build/tools/*  (helper programs for integration tests)
#   protocol/*.proto -> build/gen/protocol/*.pb-c.[ch] (protoc-c), into libhp.a
# `make SAN=1` builds the same into build/san with AddressSanitizer and
# UndefinedBehaviorSanitizer.

CC      ?= cc
SAN     ?= 0
PREFIX  ?= /usr/local

ifeq ($(SAN),1)
BUILD    ?= build/san
SANFLAGS := -fsanitize=address,undefined -fno-omit-frame-pointer -fno-sanitize-recover=all
OPT      ?= -O1 -g
else
BUILD    ?= build
SANFLAGS :=
OPT      ?= -O2 -g
endif

WARN     := -Wall -Wextra -Werror -Wshadow -Wstrict-prototypes -Wmissing-prototypes -Wcast-qual
PKG_CFLAGS := $(shell pkg-config --cflags libmodbus jansson inih sqlite3 libsystemd libmicrohttpd libxcrypt 2>/dev/null)
PKG_LIBS   := $(shell pkg-config --libs libmodbus jansson inih sqlite3 libsystemd libmicrohttpd libxcrypt 2>/dev/null)
# The version has one home: the first line of debian/changelog.
HS_VERSION := $(shell sed -n '1s/^[^(]*(\([^)]*\)).*/\1/p' debian/changelog 2>/dev/null)
CPPFLAGS += -DHS_VERSION='"$(HS_VERSION)"' -DHS_PLUGIN_DIR='"$(PLUGINDIR)"'
CPPFLAGS += -D_GNU_SOURCE -Icalc -Iprotocol -Iplugin -Itests/unit/support $(PKG_CFLAGS)
CFLAGS   += -std=c11 $(OPT) $(WARN) -fPIC $(SANFLAGS) -MMD -MP
LDFLAGS  += $(SANFLAGS)
LIBS     := $(PKG_LIBS) -lpaho-mqtt3as -lprotobuf-c -ldl -lpthread -lm

# Protobuf schemas: C generated at build time by protoc-c (protobuf-c-compiler).
PROTO_SCHEMA := $(wildcard protocol/*.proto)
GEN_DIR  := $(BUILD)/gen
GEN_C    := $(patsubst protocol/%.proto,$(GEN_DIR)/protocol/%.pb-c.c,$(PROTO_SCHEMA))
GEN_H    := $(GEN_C:.c=.h)
CPPFLAGS += -I$(GEN_DIR)

CALC_SRC   := $(wildcard calc/*.c)
PROTO_SRC  := $(wildcard protocol/*.c)
PLUGIN_SRC := $(wildcard plugin/*.c)
CLI_SRC    := $(wildcard plugin/cli/*.c)
HOST_SRC   := $(wildcard plugin/host/*.c)
SIM_SRC    := $(wildcard tests/sim/*.c)
TEST_SRC   := $(wildcard tests/unit/test_*.c)
SUPP_SRC   := $(wildcard tests/unit/support/*.c)
BENCH_SRC  := $(wildcard tests/bench/bench_*.c)
TOOL_SRC   := $(wildcard tests/tools/*.c)
TPLUG_SRC  := $(wildcard tests/plugins/*.c)

obj = $(patsubst %.c,$(BUILD)/obj/%.o,$(1))

# The page's files, compiled into the plugin (served by plugin/hs_web_static.c).
WEB_ASSETS := $(sort $(wildcard plugin/web/*))
WEB_GEN    := $(BUILD)/gen/hs_web_assets.c
WEB_OBJ    := $(BUILD)/gen/hs_web_assets.o

LIBHC := $(BUILD)/libhc.a
LIBHP := $(BUILD)/libhp.a
LIBHS := $(BUILD)/libhs.a
ALL_LIBS := $(LIBHS) $(LIBHP) $(LIBHC)

PROGS :=
ifneq ($(CLI_SRC),)
PROGS += $(BUILD)/halostage
endif
ifneq ($(HOST_SRC),)
PROGS += $(BUILD)/halostaged
endif
ifneq ($(SIM_SRC),)
PROGS += $(BUILD)/halostage-sim
endif
ifneq ($(PLUGIN_SRC),)
PROGS += $(BUILD)/halostage.so
endif

TESTS   := $(patsubst tests/unit/%.c,$(BUILD)/tests/%,$(TEST_SRC))
BENCHES := $(patsubst tests/bench/%.c,$(BUILD)/bench/%,$(BENCH_SRC))
TOOLS   := $(patsubst tests/tools/%.c,$(BUILD)/tools/%,$(TOOL_SRC))
TPLUGS  := $(patsubst tests/plugins/%.c,$(BUILD)/tests/plugins/%.so,$(TPLUG_SRC))

.PHONY: all libs tests benches check bench demo deps install install-files deb clean
.DEFAULT_GOAL := all

all: libs $(PROGS)
libs: $(ALL_LIBS)
tests: $(TESTS) $(TOOLS) $(TPLUGS)
benches: $(BENCHES)

$(BUILD)/obj/%.o: %.c | $(GEN_H)
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(CFLAGS) -c $< -o $@

$(GEN_DIR)/protocol/%.pb-c.c $(GEN_DIR)/protocol/%.pb-c.h: protocol/%.proto
	@mkdir -p $(GEN_DIR)
	protoc-c --c_out=$(GEN_DIR) $<

# An archive may be empty while a layer has no code yet.
$(LIBHC): $(call obj,$(CALC_SRC))
	@mkdir -p $(dir $@)
	rm -f $@ && ar rcs $@ $^
$(LIBHP): $(call obj,$(PROTO_SRC) $(GEN_C))
	@mkdir -p $(dir $@)
	rm -f $@ && ar rcs $@ $^
$(LIBHS): $(call obj,$(PLUGIN_SRC)) $(WEB_OBJ)
	@mkdir -p $(dir $@)
	rm -f $@ && ar rcs $@ $^

$(WEB_GEN): $(WEB_ASSETS) mk/embed.sh
	@mkdir -p $(dir $@)
	sh mk/embed.sh $(WEB_ASSETS) >$@.tmp && mv $@.tmp $@
$(WEB_OBJ): $(WEB_GEN)
	$(CC) $(CPPFLAGS) $(CFLAGS) -c $< -o $@

$(BUILD)/halostage: $(call obj,$(CLI_SRC)) $(ALL_LIBS)
	$(CC) $(LDFLAGS) -o $@ $(call obj,$(CLI_SRC)) $(ALL_LIBS) $(LIBS)
# The host exports nothing to its plugin (no -rdynamic): the plugin reaches
# the host only through the function pointers of the ABI.
$(BUILD)/halostaged: $(call obj,$(HOST_SRC)) $(ALL_LIBS)
	$(CC) $(LDFLAGS) -o $@ $(call obj,$(HOST_SRC)) $(ALL_LIBS) $(LIBS)
$(BUILD)/halostage-sim: $(call obj,$(SIM_SRC)) $(ALL_LIBS)
	$(CC) $(LDFLAGS) -o $@ $(call obj,$(SIM_SRC)) $(ALL_LIBS) $(LIBS)
# Only the ABI entry points are exported (mk/plugin.map); the rest binds
# inside the plugin.
$(BUILD)/halostage.so: $(call obj,$(PLUGIN_SRC)) $(WEB_OBJ) $(LIBHP) $(LIBHC) mk/plugin.map
	$(CC) $(LDFLAGS) -shared -Wl,--version-script=mk/plugin.map -Wl,-z,defs -o $@ \
	    $(call obj,$(PLUGIN_SRC)) $(WEB_OBJ) $(LIBHP) $(LIBHC) $(LIBS)

# Small plugins for the ABI tests (e.g. one speaking a version no host offers).
$(BUILD)/tests/plugins/%.so: tests/plugins/%.c plugin/halostage_plugin.h
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(CFLAGS) $(LDFLAGS) -shared -o $@ $<

# A test may add linker flags (e.g. -Wl,--wrap=...) in tests/unit/test_X.ldflags.
$(BUILD)/tests/%: tests/unit/%.c $(call obj,$(SUPP_SRC)) $(ALL_LIBS)
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(CFLAGS) $(LDFLAGS) -o $@ $< $(call obj,$(SUPP_SRC)) \
	    $(shell cat tests/unit/$*.ldflags 2>/dev/null) $(ALL_LIBS) $(LIBS) -lcmocka

$(BUILD)/tools/%: tests/tools/%.c $(ALL_LIBS)
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(CFLAGS) $(LDFLAGS) -o $@ $< $(ALL_LIBS) $(LIBS)

$(BUILD)/bench/%: tests/bench/%.c $(ALL_LIBS)
	@mkdir -p $(dir $@)
	$(CC) $(CPPFLAGS) $(CFLAGS) $(LDFLAGS) -o $@ $< $(ALL_LIBS) $(LIBS)

deps:
	@sh mk/deps.sh

# Every test twice: a plain build, then AddressSanitizer + UBSan.
check: deps
	$(MAKE) --no-print-directory all tests SAN=0
	$(MAKE) --no-print-directory all tests SAN=1
	@bash tests/run.sh build build/san 2>&1

bench: deps
	$(MAKE) --no-print-directory all benches SAN=0
	@bash tests/bench/run.sh build 2>&1

demo: deps
	$(MAKE) --no-print-directory all SAN=0
	@bash mk/demo.sh build

# Installs to standard paths (DESTDIR for packaging). `install-files` only
# copies files (what the Debian package uses); `install` also creates the
# service user and the state folder on this machine. A site's existing
# /etc/halostage/halostage.ini is never overwritten; the annotated reference
# lands next to it. The unit is rendered from systemd/halostaged.service.in so
# that its paths follow PREFIX.
BINDIR    ?= $(PREFIX)/bin
SBINDIR   ?= $(PREFIX)/sbin
PLUGINDIR ?= $(PREFIX)/lib/halostage
DOCDIR    ?= $(PREFIX)/share/doc/halostage
MANDIR    ?= $(PREFIX)/share/man
UNITDIR   ?= /etc/systemd/system
CONFDIR   ?= /etc/halostage
STATEDIR  ?= /var/lib/halostage

install-files: all
	install -d $(DESTDIR)$(BINDIR) $(DESTDIR)$(SBINDIR) $(DESTDIR)$(PLUGINDIR) \
	    $(DESTDIR)$(DOCDIR) $(DESTDIR)$(UNITDIR) $(DESTDIR)$(CONFDIR) \
	    $(DESTDIR)$(MANDIR)/man1 $(DESTDIR)$(MANDIR)/man5 $(DESTDIR)$(MANDIR)/man8
	install -m 0644 plugin/cli/halostage.1 $(DESTDIR)$(MANDIR)/man1/
	install -m 0644 config/halostage.conf.5 $(DESTDIR)$(MANDIR)/man5/
	install -m 0644 plugin/host/halostaged.8 $(DESTDIR)$(MANDIR)/man8/
	install -m 0755 $(BUILD)/halostage $(DESTDIR)$(BINDIR)/
	install -m 0755 $(BUILD)/halostaged $(DESTDIR)$(SBINDIR)/
	install -m 0644 $(BUILD)/halostage.so $(DESTDIR)$(PLUGINDIR)/
	install -m 0644 plugin/halostage_plugin.h README.md $(DESTDIR)$(DOCDIR)/
	sed -e 's#@SBINDIR@#$(SBINDIR)#g' -e 's#@CONFDIR@#$(CONFDIR)#g' \
	    systemd/halostaged.service.in >$(DESTDIR)$(UNITDIR)/halostaged.service
	chmod 0644 $(DESTDIR)$(UNITDIR)/halostaged.service
	install -m 0640 config/reference.ini $(DESTDIR)$(CONFDIR)/reference.ini
	install -m 0640 config/demo.ini $(DESTDIR)$(DOCDIR)/example-demo.ini

install: install-files
	@if [ -z "$(DESTDIR)" ] && [ "$$(id -u)" -eq 0 ]; then \
	    getent group halostage >/dev/null || groupadd --system halostage; \
	    getent passwd halostage >/dev/null || useradd --system --gid halostage \
	        --home-dir $(STATEDIR) --no-create-home --shell /usr/sbin/nologin halostage; \
	    install -d -m 0750 -o halostage -g halostage $(STATEDIR); \
	    chgrp -R halostage $(CONFDIR); \
	    command -v systemctl >/dev/null && systemctl daemon-reload 2>/dev/null; \
	    echo "installed; write $(CONFDIR)/halostage.ini (start from $(CONFDIR)/reference.ini), then: systemctl enable --now halostaged"; \
	else \
	    install -d $(DESTDIR)$(STATEDIR); \
	    echo "installed under $(DESTDIR); create the halostage user and chown $(STATEDIR) when deploying"; \
	fi

# The Debian package, built from a copy of the tree under build/deb (so that
# dpkg-buildpackage writes its results there, not into the parent folder),
# then checked with lintian. The version is debian/changelog's.
deb: deps
	@bash mk/deb.sh

clean:
	rm -rf build

-include $(shell find build -name '*.d' 2>/dev/null)
