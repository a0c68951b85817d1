# Shared shell helpers for scripts/start.sh and scripts/test.sh. Source, do not run.
# Every MariaDB here is private: its own data directory, socket, pid file and port on 127.0.0.1.

log() { printf '[slackline] %s\n' "$*" >&2; }
die() { printf '[slackline] error: %s\n' "$*" >&2; exit 1; }

APT_UPDATED=0
# ensure_apt BINARY PACKAGE — install a Debian package when its binary is missing.
ensure_apt() {
  local bin="$1" pkg="$2" sudo_cmd=()
  if command -v "$bin" >/dev/null 2>&1 || [ -x "/usr/sbin/$bin" ] || [ -x "/usr/bin/$bin" ]; then
    return 0
  fi
  command -v apt-get >/dev/null 2>&1 || die "'$bin' is missing and apt-get is not available: install the '$pkg' package yourself."
  if [ "$(id -u)" -ne 0 ]; then
    command -v sudo >/dev/null 2>&1 || die "'$bin' is missing; installing '$pkg' needs root. Run: sudo apt-get install -y $pkg"
    log "'$bin' is missing: installing Debian package '$pkg' (needs sudo; you may be asked for your password)"
    sudo_cmd=(sudo)
  else
    log "'$bin' is missing: installing Debian package '$pkg'"
  fi
  if [ "$APT_UPDATED" -eq 0 ]; then
    "${sudo_cmd[@]}" env DEBIAN_FRONTEND=noninteractive apt-get update -qq || die "apt-get update failed"
    APT_UPDATED=1
  fi
  # mariadb-server's own service start is refused in containers; the package still installs.
  "${sudo_cmd[@]}" env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$pkg" >/dev/null \
    || command -v "$bin" >/dev/null 2>&1 || [ -x "/usr/sbin/$bin" ] || die "installing '$pkg' failed"
}

# ensure_node_modules — npm ci when node_modules is missing or older than package-lock.json.
ensure_node_modules() {
  if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    log "installing npm packages (npm ci)"
    npm ci --no-audit --no-fund
  fi
}

# free_port — print a TCP port on 127.0.0.1 that nobody listens on right now.
free_port() {
  node -e "const s=require('net').createServer();s.listen(0,'127.0.0.1',()=>{process.stdout.write(String(s.address().port));s.close()})"
}

# port_in_use PORT — true when something accepts connections on 127.0.0.1:PORT.
port_in_use() {
  node -e "const c=require('net').connect({host:'127.0.0.1',port:+process.argv[1]});c.on('connect',()=>{c.destroy();process.exit(0)});c.on('error',()=>process.exit(1))" "$1"
}

DB_EXTRA_OPTS=()  # scripts may add mariadbd options after sourcing
MARIADBD="$(command -v mariadbd || echo /usr/sbin/mariadbd)"

# db_pid DIR — pid of the MariaDB serving DIR when it is alive, else nothing.
db_pid() {
  local pidfile="$1/mariadbd.pid" pid
  [ -f "$pidfile" ] || return 1
  pid="$(cat "$pidfile" 2>/dev/null)"
  [ -n "$pid" ] && kill -0 "$pid" 2>/dev/null && { echo "$pid"; return 0; }
  return 1
}

# db_start DIR PORT — initialise DIR once, start mariadbd on 127.0.0.1:PORT, wait until it answers.
db_start() {
  local dir="$1" port="$2" user_opt=()
  mkdir -p "$dir"
  dir="$(cd "$dir" && pwd)"
  [ "$(id -u)" -eq 0 ] && user_opt=(--user=root)
  if [ ! -d "$dir/data/mysql" ]; then
    log "initialising MariaDB data directory $dir/data"
    mkdir -p "$dir/data"
    mariadb-install-db --no-defaults --datadir="$dir/data" "${user_opt[@]}" \
      --auth-root-authentication-method=normal --skip-test-db >"$dir/install.log" 2>&1 \
      || { cat "$dir/install.log" >&2; die "mariadb-install-db failed"; }
  fi
  log "starting MariaDB on 127.0.0.1:$port (data in $dir)"
  # fd 9 (the start lock) is closed so the database never holds it.
  "$MARIADBD" --no-defaults --datadir="$dir/data" --socket="$dir/mysqld.sock" --port="$port" \
    --bind-address=127.0.0.1 --pid-file="$dir/mariadbd.pid" --log-error="$dir/mariadbd.err" \
    --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
    --skip-log-bin --innodb-buffer-pool-size=64M --max-allowed-packet=256M "${user_opt[@]}" "${DB_EXTRA_OPTS[@]}" \
    </dev/null >/dev/null 2>&1 9>&- &
  DB_SERVER_PID=$!
  local i
  for i in $(seq 1 120); do
    if mariadb-admin --no-defaults --socket="$dir/mysqld.sock" -uroot ping >/dev/null 2>&1; then
      return 0
    fi
    if ! kill -0 "$DB_SERVER_PID" 2>/dev/null; then
      tail -n 20 "$dir/mariadbd.err" >&2 || true
      die "MariaDB exited during start-up (port $port busy?); log: $dir/mariadbd.err"
    fi
    sleep 0.25
  done
  die "MariaDB did not answer within 30 s; log: $dir/mariadbd.err"
}

# db_sql DIR SQL — run SQL as root over the private socket.
db_sql() {
  mariadb --no-defaults --socket="$1/mysqld.sock" -uroot -e "$2"
}

# db_create DIR NAME USER PASSWORD [GLOBAL] — database + user for localhost and 127.0.0.1.
# With GLOBAL=1 the user may create further databases (tests give each file its own).
db_create() {
  local dir="$1" name="$2" user="$3" pass="$4" global="${5:-0}" scope
  scope="\`$name\`.*"
  [ "$global" = 1 ] && scope="*.*"
  db_sql "$dir" "
    CREATE DATABASE IF NOT EXISTS \`$name\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
    CREATE USER IF NOT EXISTS '$user'@'localhost' IDENTIFIED BY '$pass';
    CREATE USER IF NOT EXISTS '$user'@'127.0.0.1' IDENTIFIED BY '$pass';
    GRANT ALL PRIVILEGES ON $scope TO '$user'@'localhost';
    GRANT ALL PRIVILEGES ON $scope TO '$user'@'127.0.0.1';
    FLUSH PRIVILEGES;"
}

# db_stop DIR — clean shutdown, waiting for the process to exit (kill after 30 s).
db_stop() {
  local dir="$1" pid i
  pid="$(db_pid "$dir")" || return 0
  mariadb-admin --no-defaults --socket="$dir/mysqld.sock" -uroot shutdown >/dev/null 2>&1 || kill "$pid" 2>/dev/null || true
  for i in $(seq 1 120); do
    kill -0 "$pid" 2>/dev/null || return 0
    sleep 0.25
  done
  log "MariaDB (pid $pid) did not stop in 30 s; killing it"
  kill -9 "$pid" 2>/dev/null || true
}
