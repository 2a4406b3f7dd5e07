//! The only files the server touches: SCENE (read at start, written on an
//! explicit save) and the tables and meshes a scene names, read only from
//! inside the scene's folder.

use std::path::{Component, Path, PathBuf};

use lamella::scene::Scene;
use serde_json::Value;

use super::super::Failure;
use super::super::design_args::json_bytes;

/// The starter design opened without SCENE (an invented demo).
const STARTER: &str = include_str!("page/starter.json");

/// Largest file a scene may name, bytes.
const MAX_FILE_BYTES: u64 = 16 << 20;

/// SCENE, its folder and the document it held at start.
pub struct Files {
    /// SCENE as given on the command line.
    path: Option<PathBuf>,
    /// The canonical folder of SCENE: the only place files are read from.
    folder: Option<PathBuf>,
    /// The document the page opens with.
    pub document: Value,
}

impl Files {
    /// Reads and validates SCENE (or takes the starter design).
    pub fn open(path: Option<&Path>) -> Result<Files, Failure> {
        let Some(path) = path else {
            let document = serde_json::from_str(STARTER).expect("the starter design is JSON");
            let files = Files {
                path: None,
                folder: None,
                document,
            };
            files.scene(&files.document)?;
            return Ok(files);
        };
        let text = std::fs::read_to_string(path)
            .map_err(|e| Failure::input(format!("{}: cannot read scene: {e}", path.display())))?;
        let parent = path.parent().filter(|p| !p.as_os_str().is_empty());
        let folder = parent
            .unwrap_or(Path::new("."))
            .canonicalize()
            .map_err(|e| {
                Failure::input(format!("{}: cannot find its folder: {e}", path.display()))
            })?;
        let document: Value = serde_json::from_str(&text)
            .map_err(|e| Failure::input(format!("{}: {e}", path.display())))?;
        let files = Files {
            path: Some(path.to_path_buf()),
            folder: Some(folder),
            document,
        };
        // Parsed strictly, as every command does (duplicate keys refused).
        let scene = Scene::from_json(&text, &|rel| files.read(rel))
            .map_err(|e| Failure::input(format!("{}: {e}", path.display())))?;
        for w in &scene.warnings {
            eprintln!("lamella: warning: {}: {w}", path.display());
        }
        Ok(files)
    }

    /// The name error messages start with, as the CLI's start with the file.
    pub fn label(&self) -> String {
        self.path
            .as_ref()
            .map_or("(starter design)".into(), |p| p.display().to_string())
    }

    /// The file name of SCENE, for the page.
    pub fn name(&self) -> Option<String> {
        self.path.as_ref().map(|p| p.display().to_string())
    }

    /// The validated scene of an edited document.
    pub fn scene(&self, document: &Value) -> Result<Scene, Failure> {
        let text = serde_json::to_string(document).expect("JSON values serialise");
        Scene::from_json(&text, &|rel| self.read(rel))
            .map_err(|e| Failure::input(format!("{}: {e}", self.label())))
    }

    /// Warnings of a scene as the CLI prints them.
    pub fn warnings(&self, scene: &Scene) -> Vec<String> {
        (scene.warnings.iter())
            .map(|w| format!("{}: {w}", self.label()))
            .collect()
    }

    /// A file a scene names, relative to SCENE's folder and inside it:
    /// absolute paths, `..` and links leading out are refused.
    fn read(&self, rel: &str) -> Result<String, String> {
        let folder = self.folder.as_ref().ok_or(
            "the designer was started without a scene file, so a design cannot name files; \
             start it with the scene's path",
        )?;
        let relative = Path::new(rel);
        let plain = relative
            .components()
            .all(|c| matches!(c, Component::Normal(_) | Component::CurDir));
        if !plain || rel.is_empty() {
            return Err(
                "only files inside the scene's folder can be read (no absolute path, no ..)".into(),
            );
        }
        let full = folder
            .join(relative)
            .canonicalize()
            .map_err(|e| format!("cannot read {}: {e}", folder.join(relative).display()))?;
        if !full.starts_with(folder) {
            return Err(
                "this file lies outside the scene's folder (through a link); it is not read".into(),
            );
        }
        let size = std::fs::metadata(&full).map_err(|e| e.to_string())?.len();
        if size > MAX_FILE_BYTES {
            return Err(format!(
                "{size} bytes: larger than the {MAX_FILE_BYTES} bytes a scene's file may hold"
            ));
        }
        std::fs::read_to_string(&full).map_err(|e| format!("cannot read {}: {e}", full.display()))
    }

    /// Writes a valid edited document over SCENE, atomically. Returns the
    /// file's name.
    pub fn save(&self, document: &Value) -> Result<String, Failure> {
        let Some(path) = &self.path else {
            return Err(Failure::input(
                "the designer was started without a scene file: download the JSON instead, \
                 or start it with `lamella serve SCENE` to save over SCENE",
            ));
        };
        self.scene(document)?;
        super::super::output::emit(Some(path), &[json_bytes(document)])
            .map_err(|e| Failure::io(path, e))?;
        Ok(path.display().to_string())
    }
}
