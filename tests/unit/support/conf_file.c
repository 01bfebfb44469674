/* Site-configuration files for unit tests (see conf_file.h). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "conf_file.h"
#include "hs_config.h"

int conf_dir_make(conf_dir *d, const char *tag)
{
    snprintf(d->dir, sizeof d->dir, "/tmp/hs-%s-XXXXXX", tag);
    if (!mkdtemp(d->dir))
        return -1;
    snprintf(d->path, sizeof d->path, "%s/site.ini", d->dir);
    return 0;
}

int conf_dir_remove(conf_dir *d, ...)
{
    va_list ap;
    unlink(d->path);
    va_start(ap, d);
    for (const char *name = va_arg(ap, const char *); name != NULL;
         name = va_arg(ap, const char *)) {
        char other[200];
        snprintf(other, sizeof other, "%s/%s", d->dir, name);
        unlink(other);
    }
    va_end(ap);
    return rmdir(d->dir);
}

void conf_write_file(const char *file, const char *text)
{
    FILE *f = fopen(file, "w");
    assert_non_null(f);
    assert_true(fputs(text, f) >= 0);
    assert_int_equal(fclose(f), 0);
}

void conf_expect_error(const conf_dir *d, const char *text, int line, const char *what)
{
    hs_site site;
    hs_diag diag;
    char prefix[200];
    conf_write_file(d->path, text);
    assert_int_equal(hs_site_load(d->path, &site, &diag), -1);
    if (line > 0)
        snprintf(prefix, sizeof prefix, "%s:%d: ", d->path, line);
    else
        snprintf(prefix, sizeof prefix, "%s: ", d->path);
    for (unsigned i = 0; i < diag.n; i++)
        if (strncmp(diag.msg[i], prefix, strlen(prefix)) == 0 && strstr(diag.msg[i], what))
            return;
    for (unsigned i = 0; i < diag.n; i++)
        print_message("got: %s\n", diag.msg[i]);
    fail_msg("no error '%s...%s'", prefix, what);
}
