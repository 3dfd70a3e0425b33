# One image for every part of Coldseam: the API server (default command), a Dask cluster worker
# or the Dask scheduler (alternative commands; see docs/deploy.md):
#   docker run -p 8000:8000 -e COLDSEAM_API_KEYS=... IMAGE
#   docker run -e COLDSEAM_DATABASE_URL=postgresql://... -e COLDSEAM_CLUSTER=tcp://sched:8786 IMAGE
#   docker run IMAGE dask scheduler --port 8786
#   docker run IMAGE dask worker tcp://sched:8786 --nthreads 1 --nworkers 4
FROM python:3.11-slim
# gmsh's wheel links against a few X and OpenGL libraries even when run headless.
RUN apt-get update \
 && apt-get install -y --no-install-recommends libglu1-mesa libxrender1 libxcursor1 libxft2 libxinerama1 \
 && rm -rf /var/lib/apt/lists/*
WORKDIR /app
COPY pyproject.toml README.md ./
COPY service ./service
COPY frontend ./frontend
# The cluster extra: the Dask worker and scheduler, and the PostgreSQL store (psycopg,
# SQLAlchemy, Alembic with the migrations inside the package).
RUN pip install --no-cache-dir '.[cluster]'
# Inside a container the service must listen on all interfaces; publish the port only where
# intended and set COLDSEAM_API_KEYS for any shared deployment.
ENV COLDSEAM_FRONTEND_DIR=/app/frontend \
    COLDSEAM_ALLOW_OPEN=true \
    COLDSEAM_DATA_DIR=/data
VOLUME /data
# 8000: the API; 8786: the Dask scheduler, when the image runs as one.
EXPOSE 8000 8786
CMD ["coldseam", "serve", "--host", "0.0.0.0", "--port", "8000"]
