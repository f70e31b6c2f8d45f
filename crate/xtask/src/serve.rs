//! `cargo xtask serve [--no-build] [--port N]`: the built site (`demo-site/`) on 127.0.0.1, with
//! the page's headers (its Content-Security-Policy among them). Only GET and HEAD; nothing is
//! written.

use std::fs;
use std::io::{BufRead, BufReader, Write};
use std::net::{TcpListener, TcpStream};
use std::path::{Path, PathBuf};

use crate::paths::root;
use crate::site::{self, OFFLINE_FILE, SITE_CSP, SITE_DIR};

/// The port tried first; the next ones are tried when it is taken.
pub const DEFAULT_PORT: u16 = 8000;
/// How many ports from the first one are tried.
const PORTS_TRIED: u16 = 20;

/// `serve [--no-build] [--port N]`: builds the site (unless `--no-build`) and serves it from port N
/// (8000 by default) or the next free one; `--port 0` takes any free port. The browser tests serve
/// the page this way, so they see the same server and headers as a user of `cargo xtask demo`.
pub fn command(args: &[String]) -> Result<(), String> {
    let mut port = DEFAULT_PORT;
    let mut build = true;
    let mut rest = args.iter();
    while let Some(a) = rest.next() {
        match a.as_str() {
            "--no-build" => build = false,
            "--port" => {
                port = rest
                    .next()
                    .and_then(|p| p.parse().ok())
                    .ok_or("--port needs a port number (0 for any free port)")?;
            }
            other => return Err(format!("serve: unknown option {other}")),
        }
    }
    if build {
        site::build()?;
    }
    serve(port)
}

/// Serves demo-site/ on 127.0.0.1 until stopped (Ctrl-C), printing its address (the browser tests
/// wait for the `http://127.0.0.1:PORT` in that line).
pub fn serve(port: u16) -> Result<(), String> {
    let listener = bind(port)?;
    let addr = listener.local_addr().map_err(|e| e.to_string())?;
    println!("\nThe browser app is served at  http://{addr}/");
    println!(
        "Open it in a browser on this computer; the demo opens by itself. Ctrl-C stops the server."
    );
    println!(
        "For a client's site without a server: {}/{SITE_DIR}/{OFFLINE_FILE} works opened from disk.",
        root().display()
    );
    run(listener, &root().join(SITE_DIR))
}

/// A listener on 127.0.0.1 at `port` or the first free one of the next few (`0`: any free port).
pub fn bind(port: u16) -> Result<TcpListener, String> {
    let last = port.saturating_add(PORTS_TRIED - 1);
    (port..=last)
        .find_map(|p| TcpListener::bind(("127.0.0.1", p)).ok())
        .ok_or_else(|| format!("no free port on 127.0.0.1 from {port} to {last}"))
}

/// Serves the files of `dir` on `listener` until the process stops, a thread per connection.
pub fn run(listener: TcpListener, dir: &Path) -> Result<(), String> {
    for stream in listener.incoming().flatten() {
        let dir = dir.to_path_buf();
        std::thread::spawn(move || {
            let _ = answer(stream, &dir);
        });
    }
    Ok(())
}

fn answer(mut stream: TcpStream, dir: &Path) -> std::io::Result<()> {
    let mut reader = BufReader::new(stream.try_clone()?);
    let mut request = String::new();
    reader.read_line(&mut request)?;
    // Skip the headers.
    let mut line = String::new();
    while reader.read_line(&mut line)? > 2 {
        line.clear();
    }
    let mut parts = request.split_whitespace();
    let method = parts.next().unwrap_or("");
    let target = parts.next().unwrap_or("/");
    let path = target.split(['?', '#']).next().unwrap_or("/");
    let path = percent_decode(path);
    let mut file: PathBuf = dir.to_path_buf();
    for part in path.split('/').filter(|p| !p.is_empty()) {
        if part == ".." || part.contains('\\') {
            return respond(
                &mut stream,
                "400 Bad Request",
                "text/plain",
                b"bad path",
                true,
            );
        }
        file.push(part);
    }
    if file.is_dir() {
        file.push("index.html");
    }
    if method != "GET" && method != "HEAD" {
        return respond(
            &mut stream,
            "405 Method Not Allowed",
            "text/plain",
            b"read only",
            true,
        );
    }
    match fs::read(&file) {
        Ok(bytes) => respond(
            &mut stream,
            "200 OK",
            content_type(&file),
            &bytes,
            method == "GET",
        ),
        Err(_) => respond(
            &mut stream,
            "404 Not Found",
            "text/plain",
            b"not found",
            true,
        ),
    }
}

fn respond(
    stream: &mut TcpStream,
    status: &str,
    kind: &str,
    body: &[u8],
    with_body: bool,
) -> std::io::Result<()> {
    write!(
        stream,
        "HTTP/1.1 {status}\r\nContent-Type: {kind}\r\nContent-Length: {}\r\n\
         Content-Security-Policy: {SITE_CSP}\r\nCache-Control: no-store\r\nConnection: close\r\n\r\n",
        body.len()
    )?;
    if with_body {
        stream.write_all(body)?;
    }
    stream.flush()
}

fn percent_decode(s: &str) -> String {
    let bytes = s.as_bytes();
    let mut out = Vec::with_capacity(bytes.len());
    let mut i = 0;
    while i < bytes.len() {
        if bytes[i] == b'%' && i + 2 < bytes.len() {
            if let Ok(v) = u8::from_str_radix(&s[i + 1..i + 3], 16) {
                out.push(v);
                i += 3;
                continue;
            }
        }
        out.push(bytes[i]);
        i += 1;
    }
    String::from_utf8_lossy(&out).into_owned()
}

fn content_type(path: &Path) -> &'static str {
    match path.extension().and_then(|x| x.to_str()).unwrap_or("") {
        "html" => "text/html; charset=utf-8",
        "js" | "mjs" => "text/javascript; charset=utf-8",
        "css" => "text/css; charset=utf-8",
        "json" => "application/json",
        "wasm" => "application/wasm",
        "webm" => "video/webm",
        "mp4" => "video/mp4",
        "csv" => "text/csv; charset=utf-8",
        "txt" => "text/plain; charset=utf-8",
        "png" => "image/png",
        _ => "application/octet-stream",
    }
}
