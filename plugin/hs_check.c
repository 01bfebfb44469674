/* halostaged --check; see hs_commission.h. */
#include <stdio.h>
#include <string.h>

#include "hs_commission.h"
#include "hs_config.h"
#include "hs_mqtt_secret.h"

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
    /* The start-up's own secret checks, so that --check never passes a
     * file the daemon would then refuse (a restart loop under systemd). */
    const hs_mqtt_conf *m = site.mqtt;
    char password[256], err[2048];
    if (m != NULL && m->enabled &&
        hs_mqtt_password(m, config_path, password, sizeof password, err, sizeof err) != 0) {
        fprintf(stderr, "%s\n", err);
        hs_site_free(&site);
        return HS_EXIT_CONFIG;
    }
    explicit_bzero(password, sizeof password);
    if (hs_mqtt_password_in_clear(m, config_path, err, sizeof err))
        fprintf(stderr, "warning: %s\n", err);
    printf("%s: ok: site %s, %zu buses, %zu ponds, %zu signals, %zu feeds\n", config_path,
           site.site.name, site.n_buses, site.n_ponds, site.n_signals, site.n_feeds);
    hs_site_free(&site);
    return 0;
}
