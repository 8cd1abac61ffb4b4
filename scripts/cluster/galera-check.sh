#!/bin/sh
# HAProxy's health check of a Galera node (option external-check). HAProxy calls it with
#   <proxy address> <proxy port> <server address> <server port>
# and counts exit status 0 as healthy. A node is healthy only when it is Synced
# (wsrep_local_state 4) and ready for queries: a node that merely listens, that is still joining,
# donating a snapshot, or cut off from the primary component gets no connections.
# The check user has no privileges and no password, and is reachable from 127.0.0.1 only
# (scripts/lib/galera.mjs creates it); on a network, give it a password in an option file.
status=$(mariadb --no-defaults --protocol=TCP -h "$3" -P "$4" -u tidegauge_check --connect-timeout=2 -N -B \
  -e "SHOW GLOBAL STATUS WHERE Variable_name IN ('wsrep_local_state', 'wsrep_ready')" 2>/dev/null) || exit 1
printf '%s\n' "$status" | grep -q '^wsrep_local_state[[:space:]]4$' || exit 1
printf '%s\n' "$status" | grep -q '^wsrep_ready[[:space:]]ON$' || exit 1
exit 0
