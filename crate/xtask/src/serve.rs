//! `cargo xtask serve [--no-build] [--port N]`: the built site (`demo-site/`) on 127.0.0.1, with
//! the page's headers (its Content-Security-Policy among them). Files are served by tower-http's
//! `ServeDir` on hyper: byte ranges (footage seeks without being read whole), `ETag` and
//! `Last-Modified` with 304 answers, GET and HEAD only, nothing outside the folder.

use std::convert::Infallible;
use std::net::TcpListener;
use std::path::Path;

use hyper::header::{HeaderValue, CACHE_CONTROL, CONTENT_SECURITY_POLICY, CONTENT_TYPE};
use hyper::{body::Incoming, Request, Response};
use hyper_util::rt::TokioIo;
use tower_http::services::fs::ServeFileSystemResponseBody;
use tower_http::services::ServeDir;
use tower_service::Service;

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

/// Serves the files of `dir` on `listener` until the process stops: one thread, connections taken
/// in turn by the async runtime.
pub fn run(listener: TcpListener, dir: &Path) -> Result<(), String> {
    listener
        .set_nonblocking(true)
        .map_err(|e| format!("server: {e}"))?;
    let runtime = tokio::runtime::Builder::new_current_thread()
        .enable_all()
        .build()
        .map_err(|e| format!("server: {e}"))?;
    let files = ServeDir::new(dir);
    runtime.block_on(async move {
        let listener =
            tokio::net::TcpListener::from_std(listener).map_err(|e| format!("server: {e}"))?;
        loop {
            let stream = match listener.accept().await {
                Ok((stream, _)) => stream,
                // Out of file descriptors and the like: wait a little rather than spin.
                Err(_) => {
                    tokio::time::sleep(std::time::Duration::from_millis(50)).await;
                    continue;
                }
            };
            let files = files.clone();
            let service = hyper::service::service_fn(move |req| answer(files.clone(), req));
            tokio::spawn(async move {
                // A client that goes away mid-answer is no error of the server's.
                let _ = hyper::server::conn::http1::Builder::new()
                    .serve_connection(TokioIo::new(stream), service)
                    .await;
            });
        }
    })
}

type Answer = Response<ServeFileSystemResponseBody>;

/// The file's answer from `ServeDir` with the page's headers added.
async fn answer(mut files: ServeDir, req: Request<Incoming>) -> Result<Answer, Infallible> {
    let path = req.uri().path().to_owned();
    std::future::poll_fn(|cx| Service::<Request<Incoming>>::poll_ready(&mut files, cx)).await?;
    let mut res = files.call(req).await?;
    let headers = res.headers_mut();
    headers.insert(CONTENT_SECURITY_POLICY, HeaderValue::from_static(SITE_CSP));
    headers.insert(CACHE_CONTROL, HeaderValue::from_static("no-store"));
    if res.status().is_success() {
        let kind = content_type(&path);
        res.headers_mut()
            .insert(CONTENT_TYPE, HeaderValue::from_static(kind));
    }
    Ok(res)
}

/// The content type by the requested path's extension (a folder answers with its index.html).
fn content_type(path: &str) -> &'static str {
    let name = path.rsplit('/').next().unwrap_or("");
    let ext = if name.is_empty() {
        "html"
    } else {
        name.rsplit_once('.').map_or("", |(_, ext)| ext)
    };
    match ext {
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

#[cfg(test)]
mod tests {
    //! The server over loopback, as a browser talks to it: plain HTTP/1.1 on a `TcpStream`.
    //! Expected answers follow RFC 9110 (ranges: section 14; conditional requests: section 13).

    use super::*;
    use std::io::{Read, Write};
    use std::net::SocketAddr;
    use std::path::PathBuf;

    /// A status, the headers (names in lower case) and the body.
    struct Reply {
        status: u16,
        headers: Vec<(String, String)>,
        body: Vec<u8>,
    }

    impl Reply {
        fn header(&self, name: &str) -> Option<&str> {
            let found = self.headers.iter().find(|(n, _)| n == name);
            found.map(|(_, v)| v.as_str())
        }
    }

    /// A served site; its folder is removed when the test ends.
    struct Site {
        addr: SocketAddr,
        dir: PathBuf,
    }

    impl Drop for Site {
        fn drop(&mut self) {
            let _ = std::fs::remove_dir_all(&self.dir);
        }
    }

    /// A site folder (`index.html`, 100,000 bytes of footage) beside a file outside it, served on
    /// a free port of 127.0.0.1 by a server on its own thread.
    fn start(name: &str) -> Site {
        let dir = std::env::temp_dir().join(format!("xtask-serve-{}-{name}", std::process::id()));
        let site = dir.join("site");
        std::fs::create_dir_all(site.join("demo")).unwrap();
        std::fs::write(site.join("index.html"), "<!doctype html><title>t</title>").unwrap();
        std::fs::write(site.join("demo/footage.webm"), footage()).unwrap();
        std::fs::write(dir.join("secret.txt"), "outside the site").unwrap();
        let listener = bind(0).unwrap();
        let addr = listener.local_addr().unwrap();
        let folder = site.clone();
        std::thread::spawn(move || run(listener, &folder));
        Site { addr, dir }
    }

    fn footage() -> Vec<u8> {
        (0..100_000u32).map(|i| (i * 7 % 251) as u8).collect()
    }

    /// One request (`extra`: header lines) on a fresh connection, read to its end.
    fn request(addr: SocketAddr, method: &str, path: &str, extra: &[&str]) -> Reply {
        let mut stream = std::net::TcpStream::connect(addr).unwrap();
        let mut head = format!("{method} {path} HTTP/1.1\r\nHost: {addr}\r\nConnection: close\r\n");
        for line in extra {
            head.push_str(&format!("{line}\r\n"));
        }
        stream.write_all(format!("{head}\r\n").as_bytes()).unwrap();
        let mut bytes = Vec::new();
        stream.read_to_end(&mut bytes).unwrap();
        let split = bytes.windows(4).position(|w| w == b"\r\n\r\n").unwrap();
        let text = String::from_utf8(bytes[..split].to_vec()).unwrap();
        let mut lines = text.split("\r\n");
        let status = lines.next().unwrap().split(' ').nth(1).unwrap();
        let headers = lines.filter_map(|l| l.split_once(": "));
        Reply {
            status: status.parse().unwrap(),
            headers: headers
                .map(|(n, v)| (n.to_lowercase(), v.to_string()))
                .collect(),
            body: bytes[split + 4..].to_vec(),
        }
    }

    #[test]
    fn a_range_request_gets_those_bytes_and_their_place() {
        let site = start("range");
        let addr = site.addr;
        let whole = footage();
        // (Range header, first byte, last byte): a middle span, an open end, a suffix.
        for (range, first, last) in [
            ("bytes=1000-1999", 1000, 1999),
            ("bytes=99990-", 99_990, 99_999),
            ("bytes=-5", 99_995, 99_999),
        ] {
            let r = request(
                addr,
                "GET",
                "/demo/footage.webm",
                &[&format!("Range: {range}")],
            );
            assert_eq!(r.status, 206, "{range}");
            let place = format!("bytes {first}-{last}/100000");
            assert_eq!(r.header("content-range"), Some(place.as_str()));
            assert_eq!(r.body, &whole[first..=last], "{range}");
            assert_eq!(r.header("content-type"), Some("video/webm"));
        }
        let whole_file = request(addr, "GET", "/demo/footage.webm", &[]);
        assert_eq!(whole_file.header("accept-ranges"), Some("bytes"));
        assert_eq!((whole_file.status, whole_file.body), (200, whole));
        let past = request(addr, "GET", "/demo/footage.webm", &["Range: bytes=200000-"]);
        assert_eq!(past.status, 416);
    }

    #[test]
    fn an_unchanged_file_is_answered_304_by_etag_or_date() {
        let site = start("conditional");
        let addr = site.addr;
        let first = request(addr, "GET", "/index.html", &[]);
        assert_eq!(first.status, 200);
        let etag = first.header("etag").expect("an ETag").to_string();
        let date = first.header("last-modified").expect("a Last-Modified");
        for condition in [
            format!("If-None-Match: {etag}"),
            format!("If-Modified-Since: {date}"),
        ] {
            let again = request(addr, "GET", "/index.html", &[&condition]);
            assert_eq!(again.status, 304, "{condition}");
            assert!(again.body.is_empty());
        }
        let changed = request(addr, "GET", "/index.html", &["If-None-Match: \"other\""]);
        assert_eq!(changed.status, 200);
    }

    #[test]
    fn nothing_outside_the_site_is_served() {
        let site = start("outside");
        let addr = site.addr;
        for path in [
            "/../secret.txt",
            "/%2e%2e/secret.txt",
            "/..%2fsecret.txt",
            "/demo/../../secret.txt",
            "/missing.txt",
        ] {
            let r = request(addr, "GET", path, &[]);
            assert_eq!(r.status, 404, "{path}");
            assert!(
                !String::from_utf8_lossy(&r.body).contains("outside"),
                "{path}"
            );
        }
        assert_eq!(request(addr, "POST", "/index.html", &[]).status, 405);
    }

    #[test]
    fn the_page_gets_its_policy_and_type() {
        let site = start("headers");
        let addr = site.addr;
        for path in ["/", "/index.html"] {
            let r = request(addr, "GET", path, &[]);
            assert_eq!(r.status, 200, "{path}");
            assert_eq!(r.header("content-security-policy"), Some(SITE_CSP));
            assert_eq!(r.header("content-type"), Some("text/html; charset=utf-8"));
            assert_eq!(r.header("cache-control"), Some("no-store"));
        }
        let head = request(addr, "HEAD", "/index.html", &[]);
        assert_eq!((head.status, head.body.len()), (200, 0));
    }
}
