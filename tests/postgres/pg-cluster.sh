#!/usr/bin/env bash
# A throw-away PostgreSQL cluster on loopback for the tests and benchmarks: Debian's server binaries, a data folder of
# our own, trust authentication for local connections only, listening on 127.0.0.1 alone.
#   pg-cluster.sh start DIR PORT    initdb (first time) and start; prints the connection string
#   pg-cluster.sh restart DIR       stop (fast) and start again, keeping the data
#   pg-cluster.sh stop DIR          stop (fast); the folder stays until you delete it
#   pg-cluster.sh start DIR PORT    on an existing folder: start it again, keeping the data
# PostgreSQL refuses to run as root: as root, the server runs as the 'postgres' system user (from Debian's package).
set -euo pipefail
action=${1:?usage: pg-cluster.sh start|restart|stop DIR [PORT]}
dir=${2:?usage: pg-cluster.sh start|restart|stop DIR [PORT]}
case "$dir" in /*) ;; *) dir=$PWD/$dir ;; esac # absolute: the server runs from /

bindir=""
for candidate in "${PG_BINDIR:-}" /usr/lib/postgresql/*/bin; do
  if [ -n "$candidate" ] && [ -x "$candidate/pg_ctl" ]; then bindir=$candidate; fi
done
[ -n "$bindir" ] || { echo "pg-cluster: no PostgreSQL server binaries (apt-get install postgresql)" >&2; exit 1; }

as_owner() {
  # from /, so that the postgres user is not left in a folder it may not read (a mktemp clone, say)
  if [ "$(id -u)" -eq 0 ]; then (cd / && runuser -u postgres -- "$@"); else "$@"; fi
}

case "$action" in
  start)
    port=${3:?usage: pg-cluster.sh start DIR PORT}
    mkdir -p "$dir"
    if [ "$(id -u)" -eq 0 ]; then chown postgres:postgres "$dir"; fi
    if [ ! -f "$dir/data/PG_VERSION" ]; then
      as_owner "$bindir/initdb" -D "$dir/data" -U postgres --auth=trust -E UTF8 --locale=C.UTF-8 >"$dir/initdb.log" 2>&1 \
        || { cat "$dir/initdb.log" >&2; exit 1; }
      cat >>"$dir/data/postgresql.conf" <<CONF
listen_addresses = '127.0.0.1'
port = $port
unix_socket_directories = '$dir'
max_connections = 200
fsync = off
synchronous_commit = off
full_page_writes = off
CONF
    fi
    as_owner "$bindir/pg_ctl" -D "$dir/data" -l "$dir/server.log" -w -t 60 start >/dev/null
    echo "Host=127.0.0.1;Port=$port;Username=postgres;Database=postgres"
    ;;
  restart)
    as_owner "$bindir/pg_ctl" -D "$dir/data" -l "$dir/server.log" -m fast -w -t 60 restart >/dev/null
    ;;
  stop)
    if [ -f "$dir/data/postmaster.pid" ]; then as_owner "$bindir/pg_ctl" -D "$dir/data" -m fast -w -t 60 stop >/dev/null; fi
    ;;
  *) echo "pg-cluster: unknown action '$action'" >&2; exit 2 ;;
esac
