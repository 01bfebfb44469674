/* halostaged --check; see hs_commission.h. */
#include <stdio.h>
#include <string.h>

#include "hs_commission.h"
#include "hs_conf_transfer.h"
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
    /* advice, not refusal: a site may have no manual signal wired */
    for (size_t i = 0; i < site.n_transfers; i++)
        if (site.transfers[i].actuate && site.transfers[i].manual_index < 0)
            fprintf(stderr, "%s:%d: warning: [transfer %s]: actuate = yes without a manual "
                    "signal: halostaged cannot tell when an operator runs the pump locally; "
                    "wire the panel's local/remote switch and name it in manual\n",
                    config_path, site.transfers[i].line, site.transfers[i].name);
    printf("%s: ok: site %s, %zu buses, %zu ponds, %zu signals, %zu feeds\n", config_path,
           site.site.name, site.n_buses, site.n_ponds, site.n_signals, site.n_feeds);
    hs_site_free(&site);
    return 0;
}
