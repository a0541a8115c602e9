/** The operator's commands of the `panelwise` command line and their usage text (see ops-commands.ts). */
export const OPS_COMMANDS = ['create-owner', 'backup', 'restore', 'disable-demo'] as const;

export const OPS_USAGE = `       panelwise create-owner EMAIL [--name "Display Name"]
       panelwise backup OUT_FILE
       panelwise restore FILE
       panelwise disable-demo

  create-owner  creates a site owner; the password is asked twice on a terminal, or read from
                the first line of standard input (echo "$PASSWORD" | panelwise create-owner …)
  backup        copies the live database (DATABASE_PATH) through SQLite's online backup, checks
                the copy with integrity_check and says what it wrote; the server may keep running
  restore       replaces the database with a backup after checking it; refuses while a server
                holds the database
  disable-demo  removes the passwords of the demo accounts (@demo.panelwise.test)`;
