"""Line protocol driven by bench/twin.ts (one JSON object per line on stdout).

Usage: python3 twin_main.py <export.json>
Commands on stdin:
  check       loss, gradient norm and post-Adam loss on the exported weights, batch and noise (float32, and a
              float64 run of the same twin for reference)
  time <n>    n training steps (fresh torch noise each step, as the product draws fresh noise); CPU and wall s
  quit
"""
import json
import math
import sys
import time

import torch

from ssm_twin import SsmTwin, TwinTrainer

torch.set_num_threads(1)
torch.set_num_interop_threads(1)


def reply(obj):
    sys.stdout.write(json.dumps(obj) + '\n')
    sys.stdout.flush()


def check(data, dtype):
    twin = SsmTwin(data['settings'], data['weights'], dtype)
    trainer = TwinTrainer(twin, data['learningRate'], data['clipNorm'])
    ids, mask, eps = tensors(data, dtype)
    loss, norm = trainer.step(ids, mask, eps)
    with torch.no_grad():
        post = twin.loss(ids, mask, eps).item()
    return {'loss': loss, 'gradNorm': norm, 'postAdamLoss': post,
            'parameterCount': sum(q.numel() for q in twin.parameters)}


def tensors(data, dtype):
    b = data['batch']
    B, T = b['batchSize'], b['maxLen']
    ids = torch.tensor(b['ids'], dtype=torch.long).reshape(B, T)
    mask = torch.tensor(b['mask'], dtype=dtype).reshape(B, T)
    eps = torch.tensor(data['noise']['values'], dtype=dtype).reshape(data['noise']['shape'])
    return ids, mask, eps


def main():
    with open(sys.argv[1], encoding='utf8') as f:
        data = json.load(f)
    twin = SsmTwin(data['settings'], data['weights'], torch.float32)
    trainer = TwinTrainer(twin, data['learningRate'], data['clipNorm'])
    ids, mask, eps = tensors(data, torch.float32)
    gen = torch.Generator().manual_seed(1)
    reply({'ready': True, 'torch': torch.__version__, 'threads': torch.get_num_threads()})
    for line in sys.stdin:
        cmd = line.split()
        if not cmd:
            continue
        if cmd[0] == 'check':
            reply({'float32': check(data, torch.float32), 'float64': check(data, torch.float64)})
        elif cmd[0] == 'time':
            n = int(cmd[1])
            c0, w0 = time.process_time(), time.perf_counter()
            loss = math.nan
            for _ in range(n):
                noise = torch.randn(eps.shape, generator=gen)
                loss, _ = trainer.step(ids, mask, noise)
            reply({'cpuSeconds': time.process_time() - c0, 'wallSeconds': time.perf_counter() - w0, 'steps': n,
                   'lastLoss': loss})
        elif cmd[0] == 'quit':
            break
        else:
            reply({'error': f'unknown command {cmd[0]}'})


if __name__ == '__main__':
    main()
