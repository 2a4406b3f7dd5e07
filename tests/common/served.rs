//! A `lamella serve` process on a free port and a minimal HTTP/1.1 client
//! for it (shared by tests/serve.rs and benches/serve.rs).
#![allow(dead_code)]

use std::io::{BufRead, BufReader, Read, Write};
use std::net::TcpStream;
use std::path::Path;
use std::process::{Child, Command, Stdio};

/// A running server; killed when dropped.
pub struct Served {
    child: Child,
    /// The port it listens on.
    pub port: u16,
    /// The token of the printed address.
    pub token: String,
    /// The printed address.
    pub url: String,
}

/// A response: status, headers (lower-case names) and body.
pub struct Reply {
    pub status: u16,
    pub headers: Vec<(String, String)>,
    pub body: Vec<u8>,
}

impl Reply {
    /// The body as JSON.
    pub fn json(&self) -> serde_json::Value {
        serde_json::from_slice(&self.body).unwrap_or_else(|e| {
            panic!(
                "status {}: not JSON ({e}): {}",
                self.status,
                String::from_utf8_lossy(&self.body)
            )
        })
    }

    /// A header's value.
    pub fn header(&self, name: &str) -> Option<&str> {
        self.headers
            .iter()
            .find(|(n, _)| n == name)
            .map(|(_, v)| v.as_str())
    }
}

impl Served {
    /// Starts `lamella serve ARGS --port 0` and reads the address it prints.
    pub fn start(bin: &Path, args: &[&str]) -> Served {
        let mut child = Command::new(bin)
            .arg("serve")
            .args(args)
            .args(["--port", "0"])
            .stdout(Stdio::piped())
            .stderr(Stdio::null())
            .spawn()
            .expect("start lamella serve");
        let mut line = String::new();
        BufReader::new(child.stdout.take().expect("stdout"))
            .read_line(&mut line)
            .expect("the address line");
        let url = line
            .split_whitespace()
            .find(|w| w.starts_with("http://"))
            .unwrap_or_else(|| panic!("no address in {line:?}"))
            .to_owned();
        let rest = url.trim_start_matches("http://");
        let (address, token) = rest.split_once("/#token=").expect("address and token");
        let port = address.rsplit(':').next().expect("a port");
        Served {
            child,
            port: port.parse().expect("a port number"),
            token: token.to_owned(),
            url,
        }
    }

    /// `host:port` as the page sends it.
    pub fn host(&self) -> String {
        format!("127.0.0.1:{}", self.port)
    }

    /// A request with the right Host and token, plus `headers`.
    pub fn call(&self, method: &str, path: &str, body: &[u8]) -> Reply {
        let token = self.token.clone();
        self.raw(
            method,
            path,
            &[("Host", &self.host()), ("x-lamella-token", &token)],
            body,
        )
    }

    /// A JSON POST with the right Host and token.
    pub fn post(&self, path: &str, body: &serde_json::Value) -> Reply {
        self.call("POST", path, body.to_string().as_bytes())
    }

    /// A request with exactly these headers (and Content-Length).
    pub fn raw(&self, method: &str, path: &str, headers: &[(&str, &str)], body: &[u8]) -> Reply {
        let mut s = TcpStream::connect(("127.0.0.1", self.port)).expect("connect");
        let mut head = format!("{method} {path} HTTP/1.1\r\nConnection: close\r\n");
        for (n, v) in headers {
            head.push_str(&format!("{n}: {v}\r\n"));
        }
        head.push_str(&format!(
            "Content-Type: application/json\r\nContent-Length: {}\r\n\r\n",
            body.len()
        ));
        s.write_all(head.as_bytes()).expect("send");
        // A refused body may be left unread by the server.
        let _ = s.write_all(body);
        let mut bytes = Vec::new();
        let read = s.read_to_end(&mut bytes);
        let split = bytes
            .windows(4)
            .position(|w| w == b"\r\n\r\n")
            .unwrap_or_else(|| panic!("{method} {path}: no complete response ({read:?})"));
        let head = String::from_utf8_lossy(&bytes[..split]).into_owned();
        let mut lines = head.lines();
        let status = lines
            .next()
            .and_then(|l| l.split_whitespace().nth(1))
            .and_then(|c| c.parse().ok())
            .expect("a status line");
        let headers: Vec<(String, String)> = lines
            .filter_map(|l| l.split_once(':'))
            .map(|(n, v)| (n.trim().to_ascii_lowercase(), v.trim().to_owned()))
            .collect();
        let mut body = bytes[split + 4..].to_vec();
        if headers
            .iter()
            .any(|(n, v)| n == "transfer-encoding" && v.contains("chunked"))
        {
            body = unchunk(&body);
        }
        Reply {
            status,
            headers,
            body,
        }
    }
}

fn unchunk(mut b: &[u8]) -> Vec<u8> {
    let mut out = Vec::new();
    loop {
        let Some(end) = b.windows(2).position(|w| w == b"\r\n") else {
            return out;
        };
        let size =
            usize::from_str_radix(String::from_utf8_lossy(&b[..end]).trim(), 16).unwrap_or(0);
        if size == 0 {
            return out;
        }
        out.extend_from_slice(&b[end + 2..end + 2 + size]);
        b = &b[end + 4 + size..];
    }
}

impl Drop for Served {
    fn drop(&mut self) {
        let _ = self.child.kill();
        let _ = self.child.wait();
    }
}
