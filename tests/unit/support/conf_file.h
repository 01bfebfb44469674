/* Site-configuration files for unit tests: a private temporary folder, a
 * writer that fails the test on any I/O error, and a check that loading a
 * text gives one expected "FILE:LINE: ..." diagnostic. Tests only; the
 * folder lives under /tmp and is removed by conf_dir_remove. */
#ifndef CONF_FILE_H
#define CONF_FILE_H

/* A valid site of two ponds (a brine store feeding a crystalliser) and
 * three signals; lines 1..35, so a section appended starts on line 36. */
#define CONF_BASE_TWO_PONDS \
    "[site]\n"                          /* 1 */ \
    "name = test-works\n"               /* 2 */ \
    "latitude = 10\n"                   /* 3 */ \
    "[bus plc]\n"                       /* 4 */ \
    "type = tcp\n"                      /* 5 */ \
    "host = 127.0.0.1\n"                /* 6 */ \
    "port = 1502\n"                     /* 7 */ \
    "[pond a]\n"                        /* 8 */ \
    "role = brine-store\n"              /* 9 */ \
    "area = 2 ha\n"                     /* 10 */ \
    "next = b\n"                        /* 11 */ \
    "density_in = 1190 kg/m3\n"         /* 12 */ \
    "density_out = 1215 kg/m3\n"        /* 13 */ \
    "level_min = 0.5 m\n"               /* 14 */ \
    "level_max = 2 m\n"                 /* 15 */ \
    "[pond b]\n"                        /* 16 */ \
    "role = crystalliser\n"             /* 17 */ \
    "area = 5000 m2\n"                  /* 18 */ \
    "density_in = 1210 kg/m3\n"         /* 19 */ \
    "density_out = 1250 kg/m3\n"        /* 20 */ \
    "level_min = 0.1 m\n"               /* 21 */ \
    "level_max = 0.35 m\n"              /* 22 */ \
    "[signal a.temperature]\n"          /* 23 */ \
    "bus = plc\n"                       /* 24 */ \
    "address = 10\n"                    /* 25 */ \
    "type = int16\n"                    /* 26 */ \
    "unit = C\n"                        /* 27 */ \
    "[signal a.pump-run]\n"             /* 28 */ \
    "bus = plc\n"                       /* 29 */ \
    "address = 11\n"                    /* 30 */ \
    "type = uint16\n"                   /* 31 */ \
    "[signal a.pump-manual]\n"          /* 32 */ \
    "bus = plc\n"                       /* 33 */ \
    "address = 12\n"                    /* 34 */ \
    "type = uint16\n"                   /* 35 */

typedef struct {
    char dir[64];   /* the mkdtemp folder */
    char path[128]; /* DIR/site.ini, the file conf_expect_error writes */
} conf_dir;

/* Creates /tmp/hs-TAG-XXXXXX. Returns 0, or -1 (cmocka setup convention). */
int conf_dir_make(conf_dir *d, const char *tag);

/* Removes site.ini, then each of the NULL-terminated names inside the
 * folder (missing ones are fine), then the folder. Returns rmdir's result. */
int conf_dir_remove(conf_dir *d, ...);

/* Writes TEXT to FILE; any error fails the running test. */
void conf_write_file(const char *file, const char *text);

/* Writes TEXT to d->path and loads it: the load must fail and one of the
 * diagnostics must start "PATH:LINE: " (or "PATH: " when LINE is 0) and
 * contain WHAT. Otherwise prints every diagnostic and fails the test. */
void conf_expect_error(const conf_dir *d, const char *text, int line, const char *what);

#endif
