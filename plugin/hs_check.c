/* halostaged --check; see hs_commission.h. */
#include <stdio.h>

#include "hs_commission.h"
#include "hs_config.h"

int hs_check_run(const char *config_path)
{
    hs_site site;
    hs_diag diag;
    if (hs_site_load(config_path, &site, &diag) != 0) {
        for (unsigned i = 0; i < diag.n; i++)
            fprintf(stderr, "%s\n", diag.msg[i]);
        if (diag.dropped)
            fprintf(stderr, "%s: %u more errors not shown\n", config_path, diag.dropped);
        return HS_EXIT_CONFIG;
    }
    printf("%s: ok: site %s, %zu buses, %zu ponds, %zu signals, %zu feeds\n", config_path,
           site.site.name, site.n_buses, site.n_ponds, site.n_signals, site.n_feeds);
    hs_site_free(&site);
    return 0;
}
