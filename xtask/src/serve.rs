//! A small static file server for `www/` on 127.0.0.1 (development and the
//! browser tests; the page itself needs nothing but static files).

use std::io::{BufRead, BufReader, Write};
use std::net::{TcpListener, TcpStream};
use std::path::{Component, Path, PathBuf};
use std::thread;

pub struct Server {
    port: u16,
    handle: thread::JoinHandle<()>,
}

impl Server {
    /// Listens on 127.0.0.1:`port` (0 picks a free port) and serves `root`.
    pub fn start(root: PathBuf, port: u16) -> std::io::Result<Server> {
        let listener = TcpListener::bind(("127.0.0.1", port))?;
        let port = listener.local_addr()?.port();
        let handle = thread::spawn(move || {
            for stream in listener.incoming().flatten() {
                let root = root.clone();
                thread::spawn(move || {
                    let _ = handle(stream, &root);
                });
            }
        });
        Ok(Server { port, handle })
    }

    pub fn url(&self) -> String {
        format!("http://127.0.0.1:{}", self.port)
    }

    /// Serves until the process is stopped.
    pub fn wait(self) {
        let _ = self.handle.join();
    }
}

fn mime(p: &Path) -> &'static str {
    match p.extension().and_then(|e| e.to_str()) {
        Some("html") => "text/html; charset=utf-8",
        Some("js") | Some("mjs") => "text/javascript; charset=utf-8",
        Some("css") => "text/css; charset=utf-8",
        Some("wasm") => "application/wasm",
        Some("json") => "application/json",
        Some("svg") => "image/svg+xml",
        Some("png") => "image/png",
        Some("ico") => "image/x-icon",
        _ => "application/octet-stream",
    }
}

fn handle(stream: TcpStream, root: &Path) -> std::io::Result<()> {
    let mut reader = BufReader::new(stream.try_clone()?);
    let mut line = String::new();
    reader.read_line(&mut line)?;
    // Drain the headers.
    let mut h = String::new();
    while reader.read_line(&mut h)? > 2 {
        h.clear();
    }
    let mut parts = line.split_whitespace();
    let (method, target) = (parts.next().unwrap_or(""), parts.next().unwrap_or("/"));
    let path = target.split(['?', '#']).next().unwrap_or("/");
    let mut out = stream;
    if method != "GET" && method != "HEAD" {
        return respond(
            &mut out,
            "405 Method Not Allowed",
            "text/plain",
            b"GET only",
        );
    }
    let rel = Path::new(path.trim_start_matches('/'));
    if rel.components().any(|c| !matches!(c, Component::Normal(_))) {
        return respond(&mut out, "404 Not Found", "text/plain", b"not found");
    }
    let mut file = root.join(rel);
    if file.is_dir() {
        file = file.join("index.html");
    }
    match std::fs::read(&file) {
        Ok(body) => {
            let body = if method == "HEAD" { Vec::new() } else { body };
            respond(&mut out, "200 OK", mime(&file), &body)
        }
        Err(_) => respond(&mut out, "404 Not Found", "text/plain", b"not found"),
    }
}

fn respond(out: &mut TcpStream, status: &str, ctype: &str, body: &[u8]) -> std::io::Result<()> {
    write!(
        out,
        "HTTP/1.1 {status}\r\nContent-Type: {ctype}\r\nContent-Length: {}\r\nCache-Control: no-store\r\nConnection: close\r\n\r\n",
        body.len()
    )?;
    out.write_all(body)?;
    out.flush()
}
