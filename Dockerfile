FROM python:3.11-slim
# gmsh's wheel links against a few X and OpenGL libraries even when run headless.
RUN apt-get update \
 && apt-get install -y --no-install-recommends libglu1-mesa libxrender1 libxcursor1 libxft2 libxinerama1 \
 && rm -rf /var/lib/apt/lists/*
WORKDIR /app
COPY pyproject.toml README.md ./
COPY service ./service
COPY frontend ./frontend
RUN pip install --no-cache-dir .
# Inside a container the service must listen on all interfaces; publish the port only where
# intended and set COLDSEAM_API_KEYS for any shared deployment.
ENV COLDSEAM_FRONTEND_DIR=/app/frontend \
    COLDSEAM_ALLOW_OPEN=true \
    COLDSEAM_DATA_DIR=/data
VOLUME /data
EXPOSE 8000
CMD ["coldseam", "serve", "--host", "0.0.0.0", "--port", "8000"]
