"""Studies that ask the engine many times: framing tests, uncertainty, epoch drift, visits."""
