"""The Kubernetes recipe for sharded searches (contrib/kubernetes/, docs/search.md).

The manifests are checked against the Kubernetes API schema by `kubernetes-validate` (PyPI; it
ships the published OpenAPI schemas of each Kubernetes release, so it runs offline), in strict
mode (unknown fields are errors). Then the pods' own shell scripts are run here, outside any
cluster, once per JOB_COMPLETION_INDEX and then the merge, on a small search whose answer is
published: TT(8) has 6 classes (Best, Đoković, Kharaghani and Ramp, J. Combin. Des. 21, 2013)
[docs/references.md#r8-ttn-counts-and-existence: recalled]. So the commands in the manifest are the ones that work.
"""

import copy
import os
import shutil
import subprocess
from pathlib import Path

import kubernetes_validate
import pytest
import yaml

ROOT = Path(__file__).resolve().parents[2]
BIN = os.environ.get("HADAMARD_BIN", str(ROOT / "target" / "release" / "hadamard"))
KUBE = ROOT / "contrib" / "kubernetes"
VERSION = "1.33"  # backoffLimitPerIndex and podFailurePolicy are stable from 1.33 on
VERSIONS = [VERSION, "1.37"]  # the oldest the recipe needs, and the newest the validator has


def docs(name):
    return [d for d in yaml.safe_load_all((KUBE / name).read_text()) if d]


def search_job():
    return next(d for d in docs("search-job.yaml") if d["kind"] == "Job")


def env(container):
    return {e["name"]: e["value"] for e in container["env"]}


@pytest.mark.parametrize("version", VERSIONS)
@pytest.mark.parametrize("name", ["search-job.yaml", "merge-job.yaml"])
def test_manifests_match_the_kubernetes_schema(name, version):
    for doc in docs(name):
        kubernetes_validate.validate(doc, version, strict=True)


def test_the_validator_rejects_a_broken_job():
    # The check above can fail: a misspelt field and a wrong type are both refused.
    job = copy.deepcopy(search_job())
    job["spec"]["completionsMode"] = job["spec"].pop("completionMode")
    with pytest.raises(kubernetes_validate.ValidationError):
        kubernetes_validate.validate(job, VERSION, strict=True)
    job = copy.deepcopy(search_job())
    job["spec"]["completions"] = "four"
    with pytest.raises(kubernetes_validate.ValidationError):
        kubernetes_validate.validate(job, VERSION, strict=True)


def test_the_indexed_job_is_one_pod_per_shard():
    # What the schema cannot say but the API server enforces, or the recipe needs.
    job = search_job()
    spec, pod = job["spec"], job["spec"]["template"]["spec"]
    assert spec["completionMode"] == "Indexed"  # JOB_COMPLETION_INDEX exists only then
    assert pod["restartPolicy"] == "Never"  # required by podFailurePolicy
    shard = pod["containers"][0]
    assert int(env(shard)["SHARDS"]) == spec["completions"]
    assert "JOB_COMPLETION_INDEX" in shard["args"][0]
    claims = {v["persistentVolumeClaim"]["claimName"] for v in pod["volumes"]}
    pvc = next(d for d in docs("search-job.yaml") if d["kind"] == "PersistentVolumeClaim")
    assert claims == {pvc["metadata"]["name"]}
    assert "ReadWriteMany" in pvc["spec"]["accessModes"]
    merge = docs("merge-job.yaml")[0]["spec"]["template"]["spec"]
    assert {v["persistentVolumeClaim"]["claimName"] for v in merge["volumes"]} == claims
    assert env(merge["containers"][0])["RUN_DIR"] == env(shard)["RUN_DIR"]


def run_pod_script(container, extra_env, path_dir):
    script = container["args"][0]
    e = {**os.environ, **env(container), **extra_env, "PATH": f"{path_dir}:{os.environ['PATH']}"}
    return subprocess.run([*container["command"], script], env=e, capture_output=True, text=True, timeout=120)


def test_the_pod_scripts_run_the_search_and_the_merge(tmp_path):
    bindir = tmp_path / "bin"
    bindir.mkdir()
    shutil.copy(BIN, bindir / "hadamard")
    run_dir = tmp_path / "run"
    shard = search_job()["spec"]["template"]["spec"]["containers"][0]
    merge = docs("merge-job.yaml")[0]["spec"]["template"]["spec"]["containers"][0]
    small = {"SEARCH": "turyn --n 8 --classes --batch 512", "RUN_DIR": str(run_dir)}
    shards = int(env(shard)["SHARDS"])

    # The merge applied too early (one shard still missing) fails and writes nothing.
    for i in range(shards - 1):
        r = run_pod_script(shard, {**small, "JOB_COMPLETION_INDEX": str(i)}, bindir)
        assert r.returncode == 0, r.stderr
    r = run_pod_script(merge, {"RUN_DIR": str(run_dir)}, bindir)
    assert r.returncode != 0
    assert f"shard(s) {shards - 1}/{shards} missing" in r.stderr
    assert not (run_dir / "merged.txt").exists()

    r = run_pod_script(shard, {**small, "JOB_COMPLETION_INDEX": str(shards - 1)}, bindir)
    assert r.returncode == 0, r.stderr
    # A pod that runs again for a finished shard (a retry after success) changes nothing.
    r = run_pod_script(shard, {**small, "JOB_COMPLETION_INDEX": "0"}, bindir)
    assert r.returncode == 0 and "already done" in r.stdout
    r = run_pod_script(merge, {"RUN_DIR": str(run_dir)}, bindir)
    assert r.returncode == 0, r.stderr
    merged = (run_dir / "merged.txt").read_text().splitlines()
    assert len(merged) == 6  # TT(8) classes, published (see the module doc)
    assert all(line.startswith("turyn n=8 ") for line in merged)
