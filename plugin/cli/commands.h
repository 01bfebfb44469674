/* The `halostage` operator command: one file per subcommand
 * (plugin/cli/cmd_NAME.c) exporting `int hs_cmd_NAME(int argc, char **argv)`.
 * argv[0] is the subcommand's name. Return an exit status (0 ok, 2 usage,
 * 1 failure, 78 bad config). Register a new command with one line in
 * commands.c and one prototype here. */
#ifndef HS_CLI_COMMANDS_H
#define HS_CLI_COMMANDS_H

typedef int (*hs_cmd_fn)(int argc, char **argv);

struct hs_command {
    const char *name;
    hs_cmd_fn run;
    const char *summary; /* one line for `halostage help` */
};

extern const struct hs_command hs_commands[];

int hs_cmd_calc(int argc, char **argv);
int hs_cmd_brine(int argc, char **argv);
int hs_cmd_path(int argc, char **argv);
int hs_cmd_status(int argc, char **argv);
int hs_cmd_forecast(int argc, char **argv);
int hs_cmd_chain(int argc, char **argv);
int hs_cmd_plan(int argc, char **argv);

int hs_cmd_history(int argc, char **argv);
int hs_cmd_export(int argc, char **argv);
int hs_cmd_ack(int argc, char **argv);
int hs_cmd_calibrate(int argc, char **argv);
int hs_cmd_user(int argc, char **argv);
int hs_cmd_map(int argc, char **argv);
int hs_cmd_backup(int argc, char **argv);

#endif
