//! A throwaway PostgreSQL registry per test: a uniquely named database on the local server
//! (127.0.0.1:5432, trust authentication, superuser `postgres`), dropped with its login roles
//! when the test ends. With `CI=true` a server that does not answer fails the test by name.

use std::process::Command;
use std::sync::atomic::{AtomicU32, Ordering};

pub const HOST: &str = "127.0.0.1";

/// Whether the server answers; without CI a test may skip (saying so) when it does not.
pub fn available() -> bool {
    let ready = Command::new("pg_isready")
        .args(["-h", HOST, "-q"])
        .status()
        .map(|s| s.success())
        .unwrap_or(false);
    if !ready {
        assert!(
            std::env::var("CI").as_deref() != Ok("true"),
            "PostgreSQL does not answer on {HOST}:5432 (pg_isready), and CI=true: the registry tests cannot run"
        );
        eprintln!("skipped: PostgreSQL does not answer on {HOST}:5432 (pg_isready)");
    }
    ready
}

/// Runs one SQL statement through psql as `user` against `db`; returns exit success and stderr.
pub fn psql(user: &str, db: &str, sql: &str) -> (bool, String) {
    let o = Command::new("psql")
        .args([
            "-h",
            HOST,
            "-U",
            user,
            "-d",
            db,
            "-v",
            "ON_ERROR_STOP=1",
            "-qAtc",
            sql,
        ])
        .output()
        .expect("psql must be installed beside the server");
    (
        o.status.success(),
        String::from_utf8_lossy(&o.stderr).into_owned() + &String::from_utf8_lossy(&o.stdout),
    )
}

/// A uniquely named, empty database; dropped, with the login roles it made, on drop.
pub struct Database {
    pub name: String,
    roles: std::sync::Mutex<Vec<String>>,
}

static NEXT: AtomicU32 = AtomicU32::new(0);

impl Database {
    pub fn new() -> Database {
        let name = format!(
            "skb_test_{}_{}",
            std::process::id(),
            NEXT.fetch_add(1, Ordering::Relaxed)
        );
        let (ok, err) = psql("postgres", "postgres", &format!("CREATE DATABASE {name}"));
        assert!(ok, "could not create test database {name}: {err}");
        Database {
            name,
            roles: Default::default(),
        }
    }

    /// The URL `--db` takes, connecting as `user`.
    pub fn url_as(&self, user: &str) -> String {
        format!("postgres://{user}@{HOST}/{}", self.name)
    }

    pub fn url(&self) -> String {
        self.url_as("postgres")
    }

    /// A login role name unique to this database, dropped with it.
    pub fn role(&self, short: &str) -> String {
        let r = format!("{}_{short}", self.name);
        self.roles.lock().unwrap().push(r.clone());
        r
    }
}

impl Drop for Database {
    fn drop(&mut self) {
        psql(
            "postgres",
            "postgres",
            &format!("DROP DATABASE IF EXISTS {} WITH (FORCE)", self.name),
        );
        for r in self.roles.lock().unwrap().iter() {
            psql("postgres", "postgres", &format!("DROP ROLE IF EXISTS {r}"));
        }
    }
}
